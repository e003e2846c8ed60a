/**
 * What a block card shows: its formula as an expression text (rendered by Formula) built from
 * the block's own parameters, or a short caption for the nonlinear and signal blocks.
 */
import { formatEngineering } from '@loopwright/lti';
import { sampleTimeSet, type Block } from '../store/graph-bridge.ts';

/** A parameter value as a factor in a formula text: numbers compact, expressions bracketed. */
export function term(v: unknown): string | null {
  if (typeof v === 'number') return Number.isFinite(v) ? compact(v) : null;
  if (typeof v !== 'string') return null;
  const t = v.trim();
  if (t === '') return null;
  if (/^[A-Za-z_][A-Za-z0-9_]*$/.test(t) || /^(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/.test(t)) return t;
  return `(${t})`;
}

/** A number on a card: 4 significant digits in engineering notation, as the Parameters panel shows it ("50e-6"). */
export function compact(v: number): string {
  return formatEngineering(v);
}

const isZero = (t: string | null) => t === null || (Number.isFinite(Number(t)) && Number(t) === 0);
const isOneT = (t: string | null) => t !== null && Number(t) === 1 && /^[\d.]+$/.test(t);
const times = (k: string | null, rest: string) => (k === null || isOneT(k) ? rest : `${k}*${rest}`);

export interface CardContent {
  /** An expression text to render as a formula. */
  formula?: string;
  /** A caption under or instead of the formula. */
  caption?: string;
}

/** The card of a sampled controller adds its sample time to the caption ("sampled every 250e-6 s"). */
export function cardContent(b: Block): CardContent {
  const c = continuousCard(b);
  const T = b.params.sampleTime;
  if (!sampleTimeSet(T)) return c;
  const delay = b.params.computeDelay;
  const d = typeof delay === 'number' && delay > 0 ? `, delay ${show(delay)} sample${delay === 1 ? '' : 's'}` : typeof delay === 'string' && delay.trim() ? `, delay ${delay}` : '';
  const sampled = `sampled every ${show(T)} s${d}`;
  return { ...c, caption: c.caption ? `${c.caption}; ${sampled}` : sampled };
}

function continuousCard(b: Block): CardContent {
  const p = b.params;
  switch (b.kind) {
    case 'transfer-function':
      return { formula: String(p.expression ?? '') };
    case 'gain':
      return { formula: typeof p.k === 'string' && p.k.trim() ? p.k : (term(p.k) ?? '?') };
    case 'integrator':
      return { formula: `${term(p.k) ?? '1'}/s` };
    case 'first-order-lag':
      return { formula: `${term(p.k) ?? '1'}/(${times(term(p.tau), 's')} + 1)` };
    case 'lead-lag':
      return { formula: times(term(p.k), `(${times(term(p.tLead), 's')} + 1)/(${times(term(p.tLag), 's')} + 1)`) };
    case 'second-order': {
      const wn = term(p.wn) ?? 'wn';
      const z = term(p.zeta) ?? 'zeta';
      return { formula: `${times(term(p.k), `${wn}^2`)}/(s^2 + 2*${z}*${wn}*s + ${wn}^2)` };
    }
    case 'dead-time':
      return { formula: `exp(-${term(p.delay) ?? 'T'}*s)` };
    case 'pid': {
      const kp = term(p.kp) ?? '0';
      const n = term(p.n) ?? '10';
      if (p.form === 'parallel') {
        const parts = [kp];
        const ki = term(p.ki);
        const kd = term(p.kd);
        if (!isZero(ki)) parts.push(`${ki}/s`);
        if (!isZero(kd)) parts.push(`${kd}*s/(1 + ${kd}/${kp}*s/${n})`);
        return { formula: parts.join(' + '), caption: limitsCaption(p) };
      }
      const inner = ['1'];
      const ti = term(p.ti);
      const td = term(p.td);
      if (ti !== null) inner.push(`1/(${ti}*s)`);
      if (!isZero(td)) inner.push(`${td}*s/(1 + ${td}*s/${n})`);
      return { formula: inner.length === 1 ? kp : times(kp, `(${inner.join(' + ')})`), caption: limitsCaption(p) };
    }
    case 'summing-junction':
      return {};
    case 'saturation':
      return { caption: `limits ${show(p.lower)} … ${show(p.upper)}` };
    case 'rate-limit':
      return { caption: `rise ≤ ${show(p.rising)}/s, fall ≤ ${show(p.falling)}/s` };
    case 'dead-zone':
      return { caption: `zero in ${show(p.lower)} … ${show(p.upper)}` };
    case 'source': {
      const shape = String(p.shape ?? 'step');
      const amp = show(p.amplitude);
      const extra = shape === 'sinusoid' ? `, ω ${show(p.omega)} rad/s` : shape === 'pulse' ? `, width ${show(p.width)} s` : '';
      return { caption: `${shape} ${amp}${extra} at t = ${show(p.start)} s` };
    }
    case 'probe':
      return { caption: 'measured signal' };
  }
}

function show(v: unknown): string {
  if (typeof v === 'number') return compact(v);
  if (typeof v === 'string' && v.trim() !== '') return v;
  return '—';
}

function limitsCaption(p: Block['params']): string | undefined {
  const lo = typeof p.umin === 'string' && p.umin.trim() === '' ? null : p.umin;
  const hi = typeof p.umax === 'string' && p.umax.trim() === '' ? null : p.umax;
  if (lo === null && hi === null) return undefined;
  return `output ${lo === null || lo === undefined ? '−∞' : show(lo)} … ${hi === null || hi === undefined ? '∞' : show(hi)}`;
}
