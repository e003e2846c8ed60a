import { describe, expect, it } from 'vitest';
import {
  type Rational,
  loopMargins,
  padeDelay,
  parseTransferFunction,
  poly,
  polyRoots,
  rational,
  rconst,
  rmul,
  transfer,
} from '@loopwright/lti';
import { checkStructure } from '../checks/structure.ts';
import { parseDiagram, serializeDiagram } from '../document.ts';
import type { Diagram } from '../document-types.ts';
import { resolveParams } from '../resolve.ts';
import { demoDiagrams } from './index.ts';
import axisText from './positioning-axis.loop.json?raw';
import heatingText from './heating-cascade.loop.json?raw';
import supplyText from './supply-loop.loop.json?raw';
import sampledText from './sampled-axis.loop.json?raw';

const committed: Record<string, string> = {
  'positioning-axis': axisText,
  'heating-cascade': heatingText,
  'supply-loop': supplyText,
  'sampled-axis': sampledText,
};

describe('demo diagrams', () => {
  it('are the two contract ids, the loop to commission and the multirate axis', () => {
    expect(demoDiagrams.map((d) => d.id)).toEqual(['positioning-axis', 'heating-cascade', 'supply-loop', 'sampled-axis']);
  });
  for (const demo of demoDiagrams) {
    describe(demo.id, () => {
      it('the committed .loop.json is exactly serializeDiagram of the module (regenerate with scripts/write-generated.ts)', () => {
        expect(committed[demo.id]).toBe(serializeDiagram(demo.diagram));
      });
      it('loads, and loading then saving gives the same bytes', () => {
        const d = parseDiagram(committed[demo.id]);
        expect(d).toEqual(demo.diagram);
        expect(serializeDiagram(d)).toBe(committed[demo.id]);
      });
      it('has no structural findings at all', () => {
        expect(checkStructure(demo.diagram)).toEqual([]);
      });
      it('has a cut per loop, a sweep, probes, and named parameters with slider ranges and units', () => {
        const d = demo.diagram;
        // The supply loop is a single loop to commission (its loop, its output and its valve).
        const single = demo.id === 'supply-loop';
        expect(d.cuts.length).toBeGreaterThanOrEqual(single ? 1 : 2);
        expect(d.sweeps.length).toBeGreaterThanOrEqual(1);
        expect(d.blocks.filter((b) => b.kind === 'probe').length).toBeGreaterThanOrEqual(single ? 2 : 4);
        for (const p of d.parameters) {
          expect(p.unit, p.name).toBeTruthy();
          expect(p.min! < p.max!, p.name).toBe(true);
          expect(p.value >= p.min! && p.value <= p.max!, p.name).toBe(true);
        }
      });
      it('lays blocks out on the 180 × 120 px grid without overlaps', () => {
        const seen = new Set<string>();
        for (const b of demo.diagram.blocks) {
          expect(Number.isInteger(b.position.x / 180), b.id).toBe(true);
          expect(Number.isInteger(b.position.y / 120), b.id).toBe(true);
          const key = `${b.position.x},${b.position.y}`;
          expect(seen.has(key), `${b.id} at ${key}`).toBe(false);
          seen.add(key);
        }
      });
    });
  }
});

// ---------------------------------------------------------------------------------------------
// Stability and margins of each loop, assembled by hand from the blocks' numbers (resolved from
// the diagram, so the checks follow the document) with plain rational algebra — independent of
// the graph package's reduction, which the analysis tests cross-check.
// Targets are common practice, no source: phase margin ≥ 45°, gain margin ≥ 2 (6 dB), each
// inner loop at least 3× faster (gain crossover) than the loop around it.

const pi = (kp: number, ti: number): Rational => rational([kp, kp * ti], [0, ti]);
const lag = (k: number, tau: number): Rational => rational([k], [1, tau]);
/** f/(1 + f·h) without spurious common factors: (Nf·Dh)/(Df·Dh + Nf·Nh). */
const closeLoop = (f: Rational, h: Rational): Rational =>
  rational(poly.mul(f.num, h.den), poly.add(poly.mul(f.den, h.den), poly.mul(f.num, h.num)));
const num = (d: Diagram, id: string, field: string) => {
  const v = resolveParams(
    d,
    d.blocks.find((b) => b.id === id)!,
  )[field];
  if (typeof v !== 'number') throw new Error(`${id}.${field} is not a number`);
  return v;
};
const pidOf = (d: Diagram, id: string) => pi(num(d, id, 'kp'), num(d, id, 'ti'));
const lagOf = (d: Diagram, id: string) => lag(num(d, id, 'k'), num(d, id, 'tau'));
const PADE = 6;

function expectGoodLoop(L: Rational, delay: number, what: string) {
  const m = loopMargins(transfer(L, delay));
  expect(m.closedLoopStable, `${what} closed-loop stable`).toBe(true);
  expect(m.phaseMarginDeg!, `${what} phase margin`).toBeGreaterThanOrEqual(45);
  if (m.gainMargin !== null) expect(m.gainMargin, `${what} gain margin`).toBeGreaterThanOrEqual(2);
  return m;
}
const allLeft = (den: readonly number[]) => polyRoots(den).every((p) => p.re < 0);

describe('positioning axis: hand-assembled loops', () => {
  const d = demoDiagrams.find((x) => x.id === 'positioning-axis')!.diagram;
  const Tenc = num(d, 'speed-encoder', 'delay');
  const Lcur = rmul(pidOf(d, 'current-controller'), lagOf(d, 'winding'));
  const Tcur = closeLoop(Lcur, rconst(1));
  const G = rmul(rmul(pidOf(d, 'speed-controller'), Tcur), rmul(rconst(num(d, 'torque-constant', 'k')), lagOf(d, 'mechanics')));
  const Tspd = closeLoop(G, padeDelay(Tenc, PADE));
  const r = num(d, 'pulley', 'k');
  const Lpos = rmul(rmul(rconst(num(d, 'position-controller', 'k') * num(d, 'to-motor-speed', 'k')), Tspd), rational([r], [0, 1]));

  it('each loop, opened with the loops inside it closed, is stable with margins', () => {
    const mc = expectGoodLoop(Lcur, 0, 'current');
    const ms = expectGoodLoop(G, Tenc, 'speed');
    const mp = expectGoodLoop(Lpos, Tenc, 'position');
    expect(mc.gainCrossover! / ms.gainCrossover!).toBeGreaterThanOrEqual(3);
    expect(ms.gainCrossover! / mp.gainCrossover!).toBeGreaterThanOrEqual(3);
  });
  it('the whole cascade has all closed-loop poles in the left half-plane (dead time as Padé)', () => {
    expect(allLeft(closeLoop(Lpos, padeDelay(Tenc, PADE)).den)).toBe(true);
  });
  it('a position gain far beyond the slider range would destabilise it (the check can fail)', () => {
    const k = 50; // × the design gain
    expect(allLeft(closeLoop(rmul(rconst(k), Lpos), padeDelay(Tenc, PADE)).den)).toBe(false);
  });
});

describe('heating cascade: hand-assembled loops', () => {
  const d = demoDiagrams.find((x) => x.id === 'heating-cascade')!.diagram;
  const Tpipe = num(d, 'pipework', 'delay');
  // valve saturation and the ± operating point cancel in the linear model
  const Lsup = rmul(pidOf(d, 'supply-controller'), lagOf(d, 'boiler'));
  const Tsup = closeLoop(rmul(Lsup, padeDelay(Tpipe, PADE)), rconst(1));
  const G2 = rmul(rmul(lagOf(d, 'radiators'), rconst(num(d, 'radiator-share', 'k'))), lagOf(d, 'room'));
  const Lroom = rmul(rmul(pidOf(d, 'room-controller'), Tsup), G2);

  it('the heat balance shares add up to one (steady state: room follows a steady supply and outdoor mix)', () => {
    expect(num(d, 'radiator-share', 'k') + num(d, 'outdoor-share', 'k')).toBeCloseTo(1, 12);
  });
  it('each loop, opened with the loop inside it closed, is stable with margins', () => {
    const ms = expectGoodLoop(Lsup, Tpipe, 'supply');
    const mr = expectGoodLoop(Lroom, 0, 'room');
    expect(ms.gainCrossover! / mr.gainCrossover!).toBeGreaterThanOrEqual(3);
  });
  it('the whole cascade has all closed-loop poles in the left half-plane', () => {
    expect(allLeft(closeLoop(Lroom, rconst(1)).den)).toBe(true);
  });
});

describe('supply loop to commission: hand-assembled loop', () => {
  const d = demoDiagrams.find((x) => x.id === 'supply-loop')!.diagram;
  it('its start settings give a stable loop with margins on the first-guess plant block', () => {
    const plant = parseTransferFunction(String(d.blocks.find((b) => b.id === 'supply-plant')!.params.expression));
    expectGoodLoop(rmul(pidOf(d, 'supply-controller'), plant.rational), plant.delay, 'supply');
  });
});
