/**
 * Token-aware renaming of a named parameter inside an expression text: only whole identifier
 * tokens equal to `from` change; digits of numbers (1e5), longer names (Kp2) and function
 * names (exp(...)) are left alone. Whitespace and everything else keep their bytes.
 */
export function renameInExpression(text: string, from: string, to: string): string {
  let out = '';
  let i = 0;
  while (i < text.length) {
    const c = text[i];
    if (/[0-9.]/.test(c)) {
      // A number, with an optional exponent: 1.5e-3
      const m = /^(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/.exec(text.slice(i));
      const len = m ? m[0].length : 1;
      out += text.slice(i, i + len);
      i += len;
    } else if (/[A-Za-z_]/.test(c)) {
      const m = /^[A-Za-z_][A-Za-z0-9_]*/.exec(text.slice(i))!;
      const name = m[0];
      const after = text.slice(i + name.length).trimStart();
      out += name === from && !after.startsWith('(') ? to : name;
      i += name.length;
    } else {
      out += c;
      i++;
    }
  }
  return out;
}

/** The identifier tokens of an expression (not function names), for highlighting and checks. */
export function identifiersIn(text: string): string[] {
  const names: string[] = [];
  const re = /(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?|[A-Za-z_][A-Za-z0-9_]*(\s*\()?/g;
  for (const m of text.matchAll(re)) {
    if (/^[A-Za-z_]/.test(m[0]) && !m[1]) names.push(m[0]);
  }
  return names;
}
