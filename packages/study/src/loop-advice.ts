/**
 * Which reading of a loop a tuning engineer acts on, said in words. A loop enclosed by others
 * is read twice: with every other loop closed (how it runs) and inner-first (the loops around
 * it opened — how a cascade is tuned and commissioned). With the outer loops closed, L at an
 * inner cut often has open-loop right-half-plane poles (the outer loops without this one's
 * feedback are unstable); the Nyquist criterion then asks for as many counter-clockwise
 * encirclements of −1, and the phase margin of a stable design reads negative. That reading is
 * correct, but it is no distance to instability; Ms (1/min|1 + L|) is, whatever the count.
 */
import type { LoopReading, MarginsData } from './types.ts';

export interface LoopAdvice {
  /** 'inner-first': act on the reading with the loops around this one opened; 'all-closed': no loop encloses it, its one reading is the one. */
  actOn: 'inner-first' | 'all-closed';
  /** The reason, in words (Loops view, report, command line). */
  text: string;
}

/** 3 significant digits for prose; "∞" for an unlimited gain margin, "—" for none. */
const n3 = (v: number | null, unlimited = '—'): string => (v === null ? unlimited : String(Number(v.toPrecision(3))));
const poles = (p: number) => `${p} open-loop right-half-plane pole${p === 1 ? '' : 's'}`;
const encircle = (p: number) => `${p} counter-clockwise encirclement${p === 1 ? '' : 's'} of −1`;
const reading = (m: MarginsData) => `PM ${n3(m.phaseMarginDeg)}°, GM ${m.gainMarginDb === null ? '∞' : `${n3(m.gainMarginDb)} dB`}`;
/** "a", "a and b", "a, b and c". */
const list = (xs: readonly string[]) => (xs.length <= 1 ? (xs[0] ?? '') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`);

/**
 * The advice for one loop row: its margins with every other loop closed (`rhp` open-loop RHP
 * poles of that L), its inner-first reading (null when no loop encloses it), and the names of
 * the loops that reading opens.
 */
export function loopAdvice(margins: MarginsData, rhp: number, alone: LoopReading | null, openedNames: readonly string[]): LoopAdvice {
  const unstable = margins.closedLoopStable ? '' : 'The closed loop is UNSTABLE (closed-loop poles in the right half-plane). ';
  if (!alone) {
    const base = `${unstable}No loop encloses this one: act on this reading (every other loop closed).`;
    if (rhp === 0) return { actOn: 'all-closed', text: base };
    return {
      actOn: 'all-closed',
      text: `${base} L has ${poles(rhp)}: a stable closed loop needs ${encircle(rhp)} (Nyquist), so judge stability by the closed-loop poles and the distance to −1 by Ms = ${n3(margins.peakSensitivity)}, not by the sign of the phase margin.`,
    };
  }
  const opened = list(openedNames);
  const act = `Act on the inner-first reading (${opened} opened: ${reading(alone.margins)}), the one this loop is tuned and commissioned by.`;
  const parts: string[] = [];
  if (rhp > 0) {
    parts.push(
      `${unstable}With ${opened} closed, L here has ${poles(rhp)}: a stable closed loop then needs ${encircle(rhp)} (Nyquist), so its PM of ${n3(margins.phaseMarginDeg)}° is no distance to instability${margins.closedLoopStable ? ' (the closed loop is stable)' : ''}; Ms = ${n3(margins.peakSensitivity)} measures the distance to −1 either way.`,
      act,
    );
  } else {
    parts.push(
      `${unstable}${act}`,
      `With ${opened} closed (${reading(margins)}, Ms ${n3(margins.peakSensitivity)}) it shows the margin left at this point in operation.`,
    );
  }
  if (alone.openLoopRhpPoles > 0) {
    parts.push(
      `Even inner-first L has ${poles(alone.openLoopRhpPoles)} (an unstable plant or controller): there too, read stability from the closed-loop poles and Ms, not from the sign of the phase margin.`,
    );
  }
  return { actOn: 'inner-first', text: parts.join(' ') };
}
