/**
 * Readable formulas on block cards: a small display-only parser for expression texts
 * (numbers, names, + − · / ^, parentheses, exp(…)), rendered with stacked fractions,
 * superscript powers and e^(−θs). It never evaluates anything; the real parser (lti) decides
 * what is valid. Text it cannot read is shown as typed.
 */
import type { ReactNode } from 'react';

export type Expr =
  | { t: 'num'; v: string }
  | { t: 'name'; v: string }
  | { t: 'neg'; a: Expr }
  | { t: 'bin'; op: '+' | '-' | '*' | '/' | '^'; a: Expr; b: Expr }
  | { t: 'paren'; a: Expr }
  | { t: 'call'; f: string; args: Expr[] };

type Tok = { k: 'num' | 'name' | 'op'; v: string };

function tokenize(text: string): Tok[] | null {
  const out: Tok[] = [];
  let i = 0;
  while (i < text.length) {
    const c = text[i];
    if (/\s/.test(c)) {
      i++;
      continue;
    }
    const rest = text.slice(i);
    const num = /^(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?/.exec(rest);
    if (num) {
      out.push({ k: 'num', v: num[0] });
      i += num[0].length;
      continue;
    }
    const name = /^[A-Za-z_][A-Za-z0-9_]*/.exec(rest);
    if (name) {
      out.push({ k: 'name', v: name[0] });
      i += name[0].length;
      continue;
    }
    if ('+-*/^(),'.includes(c)) {
      out.push({ k: 'op', v: c });
      i++;
      continue;
    }
    return null;
  }
  return out;
}

/** Parses for display; null when the text is not a plain arithmetic expression. */
export function parseForDisplay(text: string): Expr | null {
  const toks = tokenize(text);
  if (!toks || toks.length === 0) return null;
  let p = 0;
  const peek = () => toks[p];
  const isOp = (v: string) => peek()?.k === 'op' && peek()!.v === v;
  function primary(): Expr {
    const t = peek();
    if (!t) throw new Error('end');
    if (t.k === 'num') {
      p++;
      return { t: 'num', v: t.v };
    }
    if (t.k === 'name') {
      p++;
      if (isOp('(')) {
        p++;
        const args: Expr[] = [sum()];
        while (isOp(',')) {
          p++;
          args.push(sum());
        }
        if (!isOp(')')) throw new Error(')');
        p++;
        return { t: 'call', f: t.v, args };
      }
      return { t: 'name', v: t.v };
    }
    if (isOp('(')) {
      p++;
      const a = sum();
      if (!isOp(')')) throw new Error(')');
      p++;
      return { t: 'paren', a };
    }
    throw new Error('unexpected');
  }
  function power(): Expr {
    const a = primary();
    if (isOp('^')) {
      p++;
      return { t: 'bin', op: '^', a, b: unary() };
    }
    return a;
  }
  function unary(): Expr {
    if (isOp('-')) {
      p++;
      return { t: 'neg', a: unary() };
    }
    if (isOp('+')) {
      p++;
      return unary();
    }
    return power();
  }
  function product(): Expr {
    let a = unary();
    for (;;) {
      if (isOp('*') || isOp('/')) {
        const op = peek()!.v as '*' | '/';
        p++;
        a = { t: 'bin', op, a, b: unary() };
      } else if (peek() && (peek()!.k === 'name' || isOp('('))) {
        // implicit multiplication "2s" / "2(s+1)" is not accepted by the real parser; show as typed
        throw new Error('implicit');
      } else return a;
    }
  }
  function sum(): Expr {
    let a = product();
    while (isOp('+') || isOp('-')) {
      const op = peek()!.v as '+' | '-';
      p++;
      a = { t: 'bin', op, a, b: product() };
    }
    return a;
  }
  try {
    const e = sum();
    return p === toks.length ? e : null;
  } catch {
    return null;
  }
}

const GREEK: Record<string, string> = {
  alpha: 'α',
  beta: 'β',
  gamma: 'γ',
  delta: 'δ',
  zeta: 'ζ',
  eta: 'η',
  theta: 'θ',
  tau: 'τ',
  omega: 'ω',
  phi: 'φ',
  lambda: 'λ',
  mu: 'μ',
  sigma: 'σ',
  kappa: 'κ',
  rho: 'ρ',
  xi: 'ξ',
};

/** A parameter name in textbook style: Kp → K with subscript p, wn → ω with subscript n, tau → τ. */
function renderName(v: string, swept: string | undefined, key?: string | number): ReactNode {
  const cls = v === swept ? 'fx-name fx-swept' : 'fx-name';
  const title = v === swept ? `${v} (swept)` : undefined;
  let body: ReactNode = v;
  if (v === 's') body = <i>s</i>;
  else if (GREEK[v]) body = GREEK[v];
  else if (v === 'wn')
    body = (
      <>
        ω<sub>n</sub>
      </>
    );
  else {
    // head[_tail]: "Kp" → K_p, "Ti_spd" → T_i,spd, "r_pulley" → r_pulley, "tau_m" → τ_m
    const [head, ...rest] = v.split('_');
    const tail = rest.join('_');
    const m = /^([A-Z])([a-z0-9]{1,4})$/.exec(head);
    const sub = (base: ReactNode, s: string) =>
      s ? (
        <>
          {base}
          <sub>{s}</sub>
        </>
      ) : (
        base
      );
    if (m) body = sub(m[1], [m[2], tail].filter(Boolean).join(','));
    else if (GREEK[head]) body = sub(GREEK[head], tail);
    else if (head === 'wn') body = sub('ω', ['n', tail].filter(Boolean).join(','));
    else if (tail && head) body = sub(head, tail);
  }
  return (
    <span key={key} className={cls} title={title}>
      {body}
    </span>
  );
}

function formatNumber(v: string): string {
  const n = Number(v);
  if (!Number.isFinite(n)) return v;
  if (/e/i.test(v)) {
    const [m, e] = v.toLowerCase().split('e');
    return `${m}·10^${Number(e)}`;
  }
  return v;
}

const strip = (e: Expr): Expr => (e.t === 'paren' ? strip(e.a) : e);

/** Is this factor a bare leading unit to drop ("1*x")? */
const isOne = (e: Expr) => e.t === 'num' && Number(e.v) === 1;

function render(e: Expr, swept: string | undefined): ReactNode {
  switch (e.t) {
    case 'num': {
      const f = formatNumber(e.v);
      if (f.includes('·10^')) {
        const [m, x] = f.split('·10^');
        return (
          <span className="fx-num">
            {m}·10<sup>{x}</sup>
          </span>
        );
      }
      return <span className="fx-num">{f}</span>;
    }
    case 'name':
      return renderName(e.v, swept);
    case 'neg':
      return (
        <>
          <span className="fx-op">−</span>
          {render(e.a, swept)}
        </>
      );
    case 'paren':
      return (
        <span className="fx-paren">
          <span className="fx-p">(</span>
          {render(e.a, swept)}
          <span className="fx-p">)</span>
        </span>
      );
    case 'call':
      if (e.f === 'exp' && e.args.length === 1) {
        return (
          <span className="fx-exp">
            <i>e</i>
            <sup>{render(strip(e.args[0]), swept)}</sup>
          </span>
        );
      }
      return (
        <span>
          {e.f}
          <span className="fx-p">(</span>
          {e.args.map((a, i) => (
            <span key={i}>
              {i > 0 ? ', ' : ''}
              {render(a, swept)}
            </span>
          ))}
          <span className="fx-p">)</span>
        </span>
      );
    case 'bin':
      switch (e.op) {
        case '+':
        case '-':
          return (
            <>
              {render(e.a, swept)}
              <span className="fx-op"> {e.op === '+' ? '+' : '−'} </span>
              {render(e.b, swept)}
            </>
          );
        case '*': {
          if (isOne(e.a)) return render(e.b, swept);
          const dot = strip(e.a).t === 'num' && strip(e.b).t === 'num';
          return (
            <>
              {render(e.a, swept)}
              <span className="fx-mul">{dot ? '·' : '\u2009'}</span>
              {render(e.b, swept)}
            </>
          );
        }
        case '/':
          return (
            <span className="fx-frac" role="math">
              <span className="fx-numer">{render(strip(e.a), swept)}</span>
              <span className="fx-denom">{render(strip(e.b), swept)}</span>
            </span>
          );
        case '^':
          return (
            <span className="fx-pow">
              {render(e.a, swept)}
              <sup>{render(strip(e.b), swept)}</sup>
            </span>
          );
      }
  }
}

/** A formula for display; `swept` highlights that parameter wherever it enters. */
export function Formula({ text, swept }: { text: string; swept?: string }) {
  const e = parseForDisplay(text);
  if (!e) return <span className="fx fx-raw">{text}</span>;
  return <span className="fx">{render(e, swept)}</span>;
}
