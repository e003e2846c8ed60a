// The number-only build: parsing needs none of mathjs' BigNumber, Fraction or Complex types.
import { create, parseDependencies, type MathNode } from 'mathjs/number';
import { type Complex, cabs, csub } from './complex.ts';
import { InputError, MAX_ORDER } from './errors.ts';
import { polyRoots } from './roots.ts';
import * as P from './poly.ts';
import { type Rational, S, radd, rational, rconst, rdiv, relativeDegree, rmul, rneg, rpow } from './rational.ts';
import { type TransferFunction, transfer } from './transfer.ts';

/**
 * Expression text → transfer function. mathjs' parser builds the syntax tree (a minimal
 * instance: parsing only, nothing evaluated by mathjs); our own walker then evaluates it over
 * rational functions in `s` with named parameters. Accepted: numbers, + − * /, unary ±,
 * integer powers with a constant exponent (|n| ≤ 60), parentheses, implicit multiplication
 * (`2s`, `(s+1)(s+2)`, `K(s+1)`), parameter names, `s`, and dead time `exp(-T*s)` (T ≥ 0) as a
 * product factor. Every rejection is an InputError with details.position/length in the text.
 */

const math = create({ parseDependencies });

/** Longest text accepted (keeps parsing and evaluation bounded). */
export const MAX_EXPRESSION_LENGTH = 10000;
/** Deepest parenthesis nesting accepted (keeps recursion far from the stack limit). */
export const MAX_NESTING = 100;
/** Largest |exponent| accepted in a power. */
export const MAX_POWER = 60;

/** Functions of mathjs' language that people may try; named as "unknown function" rather than a parameter. */
const KNOWN_FUNCTIONS = new Set([
  'sin',
  'cos',
  'tan',
  'asin',
  'acos',
  'atan',
  'atan2',
  'sinh',
  'cosh',
  'tanh',
  'sqrt',
  'cbrt',
  'log',
  'ln',
  'log10',
  'log2',
  'abs',
  'sign',
  'pow',
  'min',
  'max',
  'floor',
  'ceil',
  'round',
  'exp',
  'expm1',
  'nthRoot',
  'mod',
  'sum',
  'prod',
  'mean',
  'sec',
  'csc',
  'cot',
  'delay',
  'lag',
]);
/** Words that mathjs reads as operators or literals; not part of our language. */
const RESERVED = new Set(['mod', 'to', 'in', 'and', 'or', 'not', 'xor', 'true', 'false', 'null', 'undefined']);

interface Token {
  kind: 'id' | 'num';
  text: string;
  pos: number;
}

const fail = (message: string, position: number, length: number): never => {
  throw new InputError(message, { position, length });
};
const col = (pos: number) => `column ${pos + 1}`;

/** Our own scanner: validates the character set and records where each name and number is. */
function scan(text: string): Token[] {
  const tokens: Token[] = [];
  let depth = 0;
  let i = 0;
  const isIdStart = (c: string) => /[\p{L}_]/u.test(c);
  const isIdPart = (c: string) => /[\p{L}\p{N}_]/u.test(c);
  const isDigit = (c: string | undefined) => c !== undefined && c >= '0' && c <= '9';
  while (i < text.length) {
    const c = text[i];
    if (c === ' ' || c === '\t' || c === '\n' || c === '\r') {
      i++;
    } else if (isDigit(c) || (c === '.' && isDigit(text[i + 1]))) {
      const start = i;
      if (c === '0' && /[xXbBoO]/.test(text[i + 1] ?? '') && /[0-9a-fA-F]/.test(text[i + 2] ?? '')) {
        fail(`hexadecimal, binary and octal numbers are not supported (${col(i)})`, i, 2);
      }
      while (isDigit(text[i])) i++;
      if (text[i] === '.') {
        i++;
        while (isDigit(text[i])) i++;
      }
      if (
        (text[i] === 'e' || text[i] === 'E') &&
        (isDigit(text[i + 1]) || ((text[i + 1] === '+' || text[i + 1] === '-') && isDigit(text[i + 2])))
      ) {
        i += 2;
        while (isDigit(text[i])) i++;
      }
      tokens.push({ kind: 'num', text: text.slice(start, i), pos: start });
    } else if (isIdStart(c)) {
      const start = i;
      while (i < text.length && isIdPart(text[i])) i++;
      const word = text.slice(start, i);
      if (RESERVED.has(word)) fail(`'${word}' is not supported in an expression (${col(start)})`, start, word.length);
      if (word === 'NaN' || word === 'Infinity') fail(`'${word}' is not a finite number (${col(start)})`, start, word.length);
      tokens.push({ kind: 'id', text: word, pos: start });
    } else if (c === '(') {
      depth++;
      if (depth > MAX_NESTING) fail(`parentheses nested more than ${MAX_NESTING} deep (${col(i)})`, i, 1);
      i++;
    } else if (c === ')') {
      depth--;
      i++;
    } else if ('+-*/^'.includes(c)) {
      i++;
    } else {
      fail(`unexpected character '${c}' (${col(i)}): only numbers, names, + - * / ^ and parentheses are allowed`, i, 1);
    }
  }
  return tokens;
}

/** mathjs syntax errors end with "(char N)", N counted from 1. */
function syntaxError(text: string, e: unknown): never {
  const msg = e instanceof Error ? e.message : String(e);
  const m = /\(char (\d+)\)/.exec(msg);
  const pos = m ? Math.min(Math.max(Number(m[1]) - 1, 0), text.length) : 0;
  const clean = msg.replace(/\s*\(char \d+\)/, '');
  const what = pos >= text.length ? 'at the end of the text' : `at ${col(pos)}`;
  return fail(`syntax error ${what}: ${clean}`, pos, pos >= text.length ? 0 : 1);
}

/**
 * Texts parsed before (the trees are only read): every run of a slider drag resolves the same
 * parameter expressions again. Emptied when full; a text that fails is never kept.
 */
const TREES = new Map<string, { node: MathNode; tokens: Token[] }>();
const TREES_MAX = 1024;

function parseTree(text: string): { node: MathNode; tokens: Token[] } {
  const seen = typeof text === 'string' ? TREES.get(text) : undefined;
  if (seen) return seen;
  if (typeof text !== 'string') fail('expression must be text', 0, 0);
  if (text.length > MAX_EXPRESSION_LENGTH) {
    fail(
      `expression is ${text.length} characters long, above the limit of ${MAX_EXPRESSION_LENGTH}`,
      MAX_EXPRESSION_LENGTH,
      text.length - MAX_EXPRESSION_LENGTH,
    );
  }
  if (text.trim() === '') fail('expression is empty', 0, text.length);
  const tokens = scan(text);
  let node: MathNode;
  try {
    // Newlines would make mathjs read several statements; as spaces they give a plain syntax error.
    node = math.parse(text.replace(/[\r\n]/g, ' '));
  } catch (e) {
    if (e instanceof InputError) throw e;
    syntaxError(text, e);
  }
  const tree = { node: node!, tokens };
  if (TREES.size >= TREES_MAX) TREES.clear();
  TREES.set(text, tree);
  return tree;
}

/** A value during evaluation: rational part times e^(−s·delay). */
interface Value {
  r: Rational;
  delay: number;
}

/** A span of text covered by a node: from its first to the end of its last name/number token. */
interface Span {
  pos: number;
  end: number;
}

const isConstant = (v: Value) => v.delay === 0 && v.r.den.length === 1 && v.r.num.length <= 1;
const constantOf = (v: Value) => (v.r.num[0] ?? 0) / v.r.den[0];
const sameDelay = (a: number, b: number) => Math.abs(a - b) <= 1e-12 * Math.max(Math.abs(a), Math.abs(b));

class Evaluator {
  private next = { id: 0, num: 0 };
  private readonly ids: Token[];
  private readonly nums: Token[];
  private last: Token | undefined;

  constructor(
    private readonly text: string,
    tokens: Token[],
    private readonly params: Record<string, number>,
    private readonly allowS: boolean,
  ) {
    this.ids = tokens.filter((t) => t.kind === 'id');
    this.nums = tokens.filter((t) => t.kind === 'num');
  }

  /** Takes the next name token (mathjs nodes carry no positions; pre-order = text order). */
  private takeId(name: string): Token {
    const t = this.ids[this.next.id];
    if (t && t.text === name) {
      this.next.id++;
      this.last = t;
      return t;
    }
    // Defensive: fall back to the first later occurrence of the name.
    const j = this.ids.findIndex((x, k) => k >= this.next.id && x.text === name);
    if (j >= 0) {
      this.next.id = j + 1;
      this.last = this.ids[j];
      return this.ids[j];
    }
    return { kind: 'id', text: name, pos: 0 };
  }

  private takeNum(): Token {
    const t = this.nums[this.next.num];
    if (t) {
      this.next.num++;
      this.last = t;
      return t;
    }
    return { kind: 'num', text: '', pos: 0 };
  }

  private start(): number {
    // The span of the node about to be evaluated starts at the next unconsumed token.
    const a = this.ids[this.next.id]?.pos ?? Infinity;
    const b = this.nums[this.next.num]?.pos ?? Infinity;
    const p = Math.min(a, b);
    return Number.isFinite(p) ? p : this.text.length;
  }

  private span(startPos: number): Span {
    const end = this.last ? this.last.pos + this.last.text.length : startPos;
    return { pos: startPos, end: Math.max(end, startPos) };
  }

  private err(message: string, sp: Span): never {
    return fail(`${message} (${col(sp.pos)})`, sp.pos, sp.end - sp.pos);
  }

  /** Finite coefficients and bounded order after every operation. */
  private check(v: Value, sp: Span): Value {
    for (const c of v.r.num) if (!Number.isFinite(c)) this.err('a coefficient is not a finite number (overflow or NaN)', sp);
    for (const c of v.r.den) if (!Number.isFinite(c)) this.err('a coefficient is not a finite number (overflow or NaN)', sp);
    const order = Math.max(v.r.num.length, v.r.den.length) - 1;
    if (order > MAX_ORDER) this.err(`order ${order} is above the limit of ${MAX_ORDER}`, sp);
    return v;
  }

  evaluate(node: MathNode): Value {
    const s0 = this.start();
    const v = this.node(node, s0);
    return this.check(v, this.span(s0));
  }

  private node(node: MathNode, s0: number): Value {
    switch (node.type) {
      case 'ParenthesisNode':
        return this.evaluate((node as unknown as { content: MathNode }).content);
      case 'ConstantNode': {
        const t = this.takeNum();
        const value = (node as unknown as { value: unknown }).value;
        const sp = this.span(s0);
        if (typeof value !== 'number') this.err('only numbers are allowed as constants', sp);
        if (!Number.isFinite(value)) this.err(`number ${t.text} is not finite`, sp);
        return { r: rconst(value as number), delay: 0 };
      }
      case 'SymbolNode': {
        const name = (node as unknown as { name: string }).name;
        const t = this.takeId(name);
        return this.symbol(name, { pos: t.pos, end: t.pos + name.length });
      }
      case 'OperatorNode':
        return this.operator(node as unknown as { op: string; fn: string; args: MathNode[]; isPercentage?: boolean }, s0);
      case 'FunctionNode':
        return this.call(node as unknown as { fn: MathNode; args: MathNode[] }, s0);
      default: {
        // Anything else (assignment, matrices, accessors, conditionals…) is outside the language.
        const sp = { pos: s0, end: Math.min(this.text.length, s0 + 1) };
        return this.err(`unsupported construct (${node.type.replace(/Node$/, '').toLowerCase()})`, sp);
      }
    }
  }

  private symbol(name: string, sp: Span): Value {
    if (name === 's') {
      if (!this.allowS) this.err(`'s' is not allowed here: a plain number is expected`, sp);
      return { r: S, delay: 0 };
    }
    if (!Object.prototype.hasOwnProperty.call(this.params, name)) {
      this.err(`unknown parameter '${name}'`, sp);
    }
    const v = this.params[name];
    if (typeof v !== 'number' || !Number.isFinite(v)) this.err(`parameter '${name}' has the value ${v}, not a finite number`, sp);
    return { r: rconst(v), delay: 0 };
  }

  private operator(n: { op: string; fn: string; args: MathNode[]; isPercentage?: boolean }, s0: number): Value {
    const { op, fn, args } = n;
    if (n.isPercentage) this.err(`'%' is not supported`, { pos: s0, end: s0 + 1 });
    if (args.length === 1 && (fn === 'unaryMinus' || fn === 'unaryPlus')) {
      const a = this.evaluate(args[0]);
      return fn === 'unaryMinus' ? { r: rneg(a.r), delay: a.delay } : a;
    }
    if (args.length !== 2 || !['+', '-', '*', '/', '^'].includes(op)) {
      return this.err(`operator '${op}' is not supported`, { pos: s0, end: s0 + 1 });
    }
    const a = this.evaluate(args[0]);
    const sb = this.start();
    if (op === '^') return this.power(a, args[1], s0, sb);
    const b = this.evaluate(args[1]);
    const spB = this.span(sb);
    const sp = this.span(s0);
    switch (op) {
      case '+':
      case '-': {
        const bb = op === '-' ? { r: rneg(b.r), delay: b.delay } : b;
        if (P.isZero(a.r.num)) return bb;
        if (P.isZero(bb.r.num)) return a;
        if (!sameDelay(a.delay, bb.delay)) {
          this.err(
            `${op === '+' ? 'sum' : 'difference'} of terms with different dead times (${a.delay} s and ${bb.delay} s): ` +
              'the result is not a rational function times one dead time; approximate the delay by a Padé block or restructure the diagram',
            sp,
          );
        }
        return { r: addOverCommonDenominator(a.r, bb.r), delay: a.delay };
      }
      case '*':
        return { r: rmul(a.r, b.r), delay: a.delay + b.delay };
      default: {
        if (P.isZero(b.r.num)) this.err('division by zero: the denominator is identically zero', spB);
        const delay = a.delay - b.delay;
        if (delay < 0 && !sameDelay(a.delay, b.delay)) {
          this.err('a dead time in a denominator gives e^(+sT), a prediction that no system can realise', spB);
        }
        return { r: rdiv(a.r, b.r), delay: sameDelay(a.delay, b.delay) ? 0 : delay };
      }
    }
  }

  private power(a: Value, expNode: MathNode, s0: number, sb: number): Value {
    const e = this.evaluate(expNode);
    const spE = this.span(sb);
    if (e.delay !== 0 || e.r.den.length > 1 || e.r.num.length > 1) {
      this.err(`an exponent must be a constant integer; this one depends on 's'`, spE);
    }
    const n = constantOf(e);
    if (!Number.isInteger(n)) this.err(`power ${n} is not an integer: only integer powers are supported`, spE);
    if (Math.abs(n) > MAX_POWER) this.err(`power ${n} is above the limit of ±${MAX_POWER}`, spE);
    const sp = this.span(s0);
    const order = Math.max(a.r.num.length, a.r.den.length) - 1;
    if (order * Math.abs(n) > MAX_ORDER) this.err(`order ${order * Math.abs(n)} is above the limit of ${MAX_ORDER}`, sp);
    if (n < 0 && P.isZero(a.r.num)) this.err('division by zero: a negative power of zero', sp);
    if (n < 0 && a.delay > 0) this.err('a dead time raised to a negative power gives e^(+sT), which no system can realise', sp);
    return { r: rpow(a.r, n), delay: a.delay * n };
  }

  private call(n: { fn: MathNode; args: MathNode[] }, s0: number): Value {
    const fnNode = n.fn as unknown as { type: string; name?: string };
    if (fnNode.type !== 'SymbolNode' || !fnNode.name) {
      return this.err('unsupported function call', { pos: s0, end: s0 + 1 });
    }
    const name = fnNode.name;
    const t = this.takeId(name);
    const nameSpan = { pos: t.pos, end: t.pos + name.length };
    if (name === 'exp') {
      if (n.args.length !== 1) this.err(`exp takes one argument, got ${n.args.length}`, nameSpan);
      const sa = this.start();
      const arg = this.evaluate(n.args[0]);
      const sp = this.span(s0);
      const spA = this.span(sa);
      // The argument must be exactly c·s with c ≤ 0 (a constant multiple of s): e^(−sT), T = −c.
      const r = arg.r;
      const ok = arg.delay === 0 && r.den.length === 1 && (r.num.length === 0 || (r.num.length === 2 && r.num[0] === 0));
      if (!ok) {
        this.err(`exp is only allowed as a dead time exp(-T*s) with a constant T ≥ 0; this argument is not a constant times s`, spA);
      }
      const T = r.num.length === 0 ? 0 : -r.num[1] / r.den[0];
      if (!(T >= 0)) this.err(`dead time exp(-T*s) needs T ≥ 0, here T = ${T}`, spA);
      if (!this.allowS && T !== 0) this.err(`'s' is not allowed here: a plain number is expected`, sp);
      return { r: rconst(1), delay: T === 0 ? 0 : T };
    }
    if (KNOWN_FUNCTIONS.has(name)) {
      this.err(`unknown function '${name}': only exp(-T*s) (dead time) is supported`, nameSpan);
    }
    // `K(s+1)` and `s(s+1)`: mathjs reads a call; a parameter or s followed by one bracket is a product.
    if (n.args.length !== 1) this.err(`unknown function '${name}'`, nameSpan);
    if (name !== 's' && !Object.prototype.hasOwnProperty.call(this.params, name)) {
      this.err(`unknown parameter '${name}' (only exp(-T*s) may be called as a function)`, nameSpan);
    }
    const f = this.symbol(name, nameSpan);
    const x = this.evaluate(n.args[0]);
    return { r: rmul(f.r, x.r), delay: f.delay + x.delay };
  }
}

/**
 * a + b over the least common denominator: factors shared by both denominators (found as
 * common roots) are not multiplied in twice, so `1/s + 1/(s*(s+1))` is (s + 2)/(s(s + 1))
 * instead of gaining a spurious pole–zero pair at 0 that would later look like a hidden mode.
 * Falls back to the plain product of denominators when the division by the shared factor is
 * not clean (relative remainder above 1e-9).
 */
function addOverCommonDenominator(a: Rational, b: Rational): Rational {
  const plain = () => radd(a, b);
  let da = P.trim(a.den);
  let db = P.trim(b.den);
  if (da.length <= 1 || db.length <= 1) return plain();
  if (da.length === db.length && da.every((x, i) => x === db[i])) return plain(); // radd handles equal denominators
  // Exact powers of s first (integrators are the common case), then the remaining common roots.
  let k = 0;
  while (da[k] === 0 && db[k] === 0) k++;
  da = da.slice(k);
  db = db.slice(k);
  let g: number[] = [1];
  if (da.length > 1 && db.length > 1) {
    const rb = polyRoots(db);
    const used = new Array<boolean>(rb.length).fill(false);
    const common: Complex[] = [];
    for (const z of polyRoots(da)) {
      const j = rb.findIndex((w, i) => !used[i] && cabs(csub(z, w)) <= 1e-9 * Math.max(1, cabs(z)));
      if (j >= 0) {
        used[j] = true;
        common.push(z);
      }
    }
    // Keep only complete conjugate pairs so that g is real.
    const paired = common.filter((z) => z.im === 0 || common.some((w) => w.re === z.re && w.im === -z.im));
    if (paired.length) g = P.fromRoots(paired);
  }
  const qa = P.divmod(da, g);
  const qb = P.divmod(db, g);
  const clean = (r: number[], p: number[]) => r.every((x) => Math.abs(x) <= 1e-9 * p.reduce((m, c) => Math.max(m, Math.abs(c)), 0));
  if (!clean(qa.r, da) || !clean(qb.r, db)) return plain();
  // a.num/(s^k g qa) + b.num/(s^k g qb) = (a.num qb + b.num qa)/(s^k g qa qb) = (…)/(a.den qb).
  return rational(P.add(P.mul(a.num, qb.q), P.mul(b.num, qa.q)), P.mul(a.den, qb.q));
}

function run(text: string, params: Record<string, number>, allowS: boolean): Value {
  const { node, tokens } = parseTree(text);
  const ev = new Evaluator(text, tokens, params ?? {}, allowS);
  try {
    return ev.evaluate(node);
  } catch (e) {
    if (e instanceof InputError) throw e;
    if (e instanceof RangeError) fail('expression is too deeply nested to evaluate', 0, text.length);
    throw e;
  }
}

/**
 * Parses a transfer-function expression such as `Kp*(1 + 1/(Ti*s)) * 4/(s*(0.25*s+1))` or
 * `2*exp(-0.5*s)/(3*s+1)`. Common factors are kept (cancel them with cancelCommon, which
 * reports them). Throws InputError with details.position/length.
 */
export function parseTransferFunction(text: string, params: Record<string, number> = {}): TransferFunction {
  const v = run(text, params, true);
  const clean = (c: readonly number[]) => c.map((x) => x + 0); // no −0 in results
  // The zero function carries no dead time (0·e^(−sT) = 0).
  return transfer(rational(clean(v.r.num), clean(v.r.den)), P.isZero(v.r.num) ? 0 : v.delay);
}

/** Parses a plain number expression over parameters (`2*Kv`, `1/(4*zeta)`); `s` is an error. */
export function parseScalar(text: string, params: Record<string, number> = {}): number {
  const v = run(text, params, false);
  if (!isConstant(v)) fail('a plain number is expected', 0, text.length);
  return constantOf(v) + 0;
}

/** The parameter names an expression uses (excluding s and exp), in order of first appearance. */
export function expressionParameters(text: string): string[] {
  const { node } = parseTree(text);
  const out: string[] = [];
  const add = (name: string) => {
    if (name !== 's' && !out.includes(name)) out.push(name);
  };
  node.traverse((n, _path, parent) => {
    if (n.type === 'FunctionNode') {
      const fn = (n as unknown as { fn: { type: string; name?: string } }).fn;
      if (fn.type === 'SymbolNode' && fn.name && fn.name !== 'exp' && !KNOWN_FUNCTIONS.has(fn.name)) add(fn.name);
    } else if (n.type === 'SymbolNode') {
      const name = (n as unknown as { name: string }).name;
      const isCallee = parent?.type === 'FunctionNode' && (parent as unknown as { fn: MathNode }).fn === n;
      if (isCallee && (name === 'exp' || KNOWN_FUNCTIONS.has(name))) return;
      add(name);
    }
  });
  return out;
}

/** A two- or three-line message: the text, a caret under the fault, and the message. */
export function formatExpressionError(text: string, error: unknown): string {
  const message = error instanceof Error ? error.message : String(error);
  const d = error instanceof InputError ? error.details : {};
  if (d.position === undefined || text.length > 200) return message;
  const pos = Math.min(Math.max(d.position, 0), text.length);
  const len = Math.max(1, Math.min(d.length ?? 1, text.length - pos || 1));
  return `${text}\n${' '.repeat(pos)}${'^'.repeat(len)}\n${message}`;
}

/** Throws an InputError naming `what` when the transfer function is improper (more zeros than poles). */
export function requireProper(tf: TransferFunction, what: string): void {
  const rd = relativeDegree(tf.rational);
  if (rd < 0) {
    throw new InputError(
      `${what} is improper (numerator degree ${P.degree(tf.rational.num)} > denominator degree ${P.degree(tf.rational.den)}): add poles, e.g. a derivative filter`,
      { field: what },
    );
  }
}
