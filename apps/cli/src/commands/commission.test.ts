/**
 * `loopwright fit` and `loopwright tune` through main() with a fake io: the JSON fields the
 * issue names, errors naming what is wrong, standard input, and predicted margins that equal
 * what `loopwright margins` (and `loopwright loops` on the written diagram) give for the tuned loop.
 */
import { describe, expect, it } from 'vitest';
import { heatingCascade, serializeDiagram } from '@loopwright/graph';
import { supplyValveBumpCsv } from '@loopwright/fit';
import { parseTransferFunction } from '@loopwright/lti';
import { build } from '@loopwright/study/testing';
import { main } from '../main.ts';
import { fakeIo as sharedFakeIo } from '../fake-io.ts';

const fakeIo = (files: Record<string, string>, stdin?: string) => sharedFakeIo(files, stdin !== undefined ? { stdin } : {});

const csv = supplyValveBumpCsv();
const files = { 'bump.csv': csv, 'heating.loop.json': serializeDiagram(heatingCascade) };

async function run(argv: string[], f = fakeIo(files)) {
  const code = await main(argv, f.io);
  return { code, out: f.out(), err: f.err(), json: () => JSON.parse(f.out()), written: f.written, f };
}

describe('loopwright fit', () => {
  it('--json holds model, gain, timeConstants (largest first), deadTime, nrmse, intervals and an expression the parser accepts', async () => {
    const r = await run(['fit', 'bump.csv', '--model', 'sopdt', '--json']);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const j = r.json();
    expect(j.model).toBe('sopdt');
    expect(j.timeConstants).toHaveLength(2);
    expect(j.timeConstants[0]).toBeGreaterThan(j.timeConstants[1]);
    expect(j.intervals.gain[0]).toBeLessThan(j.gain);
    expect(j.intervals.gain[1]).toBeGreaterThan(j.gain);
    expect(j.nrmse).toBeGreaterThan(0);
    expect(j.testLog).toMatchObject({
      fileName: 'bump.csv',
      samples: 1801,
      columns: { time: 'time_s', input: 'valve_pct', output: 'supply_temp_C' },
    });
    expect(j.caution).toMatch(/only as good as the test/);
    // The expression is the fitted model (6 significant digits): same static gain and dead time.
    const tf = parseTransferFunction(j.expression);
    expect(tf.delay).toBeCloseTo(j.deadTime, 3);
    expect(tf.rational.num[0] / tf.rational.den[0]).toBeCloseTo(j.gain, 5);
  });
  it('ipdt has no time constants; columns by position; "-" reads standard input', async () => {
    const f = fakeIo(files, csv);
    const r = await run(['fit', '-', '--model', 'ipdt', '--time', '1', '--input', '2', '--output', '3', '--json'], f);
    expect(r.code).toBe(0);
    expect(r.json().timeConstants).toEqual([]);
    expect(r.json().testLog.fileName).toBe('standard input');
  });
  it('text output lists every model with intervals and the caution', async () => {
    const r = await run(['fit', 'bump.csv', '--model', 'all']);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/^FOPDT /m);
    expect(r.out).toMatch(/^SOPDT /m);
    expect(r.out).toMatch(/^IPDT /m);
    expect(r.out).toMatch(/NRMSE/);
    expect(r.out).toMatch(/only as good as the test behind it/);
  });
  it('bad data and flags are refused (exit 2) naming the row, column or flag', async () => {
    const bad = await run(['fit', 'bad.csv', '--json'], fakeIo({ 'bad.csv': csv.replace('\n7,50.0,', '\n7,,') }));
    expect(bad.code).toBe(2);
    expect(bad.json().error.message).toBe("row 9, column 'valve_pct': the cell is empty");
    const col = await run(['fit', 'bump.csv', '--output', 'flow']);
    expect(col.code).toBe(2);
    expect(col.err).toContain("output column: no column named 'flow'");
    expect((await run(['fit', 'bump.csv', '--model', 'fourth'])).err).toContain('--model: "fourth" is not one of fopdt, sopdt, ipdt, all');
    expect((await run(['fit', 'missing.csv'])).err).toContain('cannot read missing.csv: no such file');
  });
});

describe('loopwright tune', () => {
  it('--model: SIMC PI on 2e^(−s)/(10s+1) gives Kc = 2.5, τI = 8 (Skogestad 2003) [R36 (a)]; the JSON fields the issue names', async () => {
    const r = await run(['tune', '--model', '2*exp(-1*s)/(10*s+1)', '--rule', 'simc', '--json']);
    expect(r.err).toBe('');
    const j = r.json();
    expect(j.rule).toBe('simc');
    expect(j.controller.kp).toBeCloseTo(2.5, 12);
    expect(j.controller.ti).toBeCloseTo(8, 12);
    expect(j.controller.td).toBe(0);
    expect(j.model).toEqual({ kind: 'fopdt', gain: expect.closeTo(2, 12), timeConstants: [expect.closeTo(10, 12)], deadTime: 1 });
    expect(Object.keys(j.predicted)).toEqual(expect.arrayContaining(['ms', 'gainMargin', 'phaseMarginDeg', 'delayMargin']));
    expect(j.caution).toMatch(/small steps/);
  });
  it('predicted margins equal what `loopwright margins` gives for the tuned loop (model and cut)', async () => {
    const check = async (argv: string[]) => {
      const t = (await run(argv)).json();
      const m = (await run(['margins', '--loop', t.loop, '--json'])).json();
      expect(m.gainMargin, argv.join(' ')).toBeCloseTo(t.predicted.gainMargin, 8);
      expect(m.phaseMarginDeg, argv.join(' ')).toBeCloseTo(t.predicted.phaseMarginDeg, 7);
      expect(m.delayMargin, argv.join(' ')).toBeCloseTo(t.predicted.delayMargin, 7);
      expect(m.peakSensitivity, argv.join(' ')).toBeCloseTo(t.predicted.ms, 8);
      return t;
    };
    await check(['tune', '--model', '0.8*exp(-20*s)/((90*s+1)*(12*s+1))', '--rule', 'amigo', '--json']);
    await check(['tune', '--model', '0.4*exp(-2*s)/s', '--rule', 'lambda', '--json']);
    await check(['tune', 'heating.loop.json', '--cut', 'cut-supply', '--rule', 'ms', '--json']);
    await check(['tune', 'heating.loop.json', '--cut', 'cut-room', '--rule', 'simc', '--controller', 'pi', '--json']);
  });
  it('--write puts the setting into the diagram; `loopwright loops` on it reads the predicted margins at the cut', async () => {
    const f = fakeIo(files);
    const t = await run(['tune', 'heating.loop.json', '--cut', 'cut-supply', '--rule', 'amigo', '--write', 'tuned.loop.json', '--json'], f);
    expect(t.code).toBe(0);
    expect(f.written['tuned.loop.json']).toBeDefined();
    const loops = await run(['loops', 'tuned.loop.json', '--json'], fakeIo({ 'tuned.loop.json': f.written['tuned.loop.json'] }));
    const row = loops.json().cuts.find((c: { cut: string }) => c.cut === 'cut-supply');
    // The supply loop is read inner-first (the room loop around it opened), as loops' "alone".
    expect(row.alone.opened).toEqual(['cut-room']);
    expect(row.alone.margins.phaseMarginDeg).toBeCloseTo(t.json().predicted.phaseMarginDeg, 9);
    expect(row.alone.margins.peakSensitivity).toBeCloseTo(t.json().predicted.ms, 9);
    const tuned = JSON.parse(f.written['tuned.loop.json']);
    expect(tuned.parameters.find((p: { name: string }) => p.name === 'Kp_sup').value).toBe(t.json().controller.kp);
  });
  it('zn-ultimate reads Ku and Pu from the diagram: 1/(s(s+2)(s+4)) behind a PID block has Ku = 48 at ω = 2√2 (Routh) [R34]', async () => {
    const d = build(
      [
        ['r', 'source'],
        ['e', 'summing-junction', { signs: '+-' }],
        ['c', 'pid', { kp: 1, ti: 5 }],
        ['g', 'transfer-function', { expression: '1/(s*(s+2)*(s+4))' }],
        ['y', 'probe'],
      ],
      ['r->e.in1', 'e->c', 'c->g', 'g->y', 'fb:g->e.in2'],
      [],
      { cuts: [{ id: 'loop', wire: 'fb' }] },
    );
    const f = fakeIo({}, JSON.stringify(d));
    const r = await run(['tune', '-', '--rule', 'zn-ultimate', '--controller', 'pid', '--json'], f);
    expect(r.err).toBe('');
    const j = r.json();
    expect(j.ultimate.ku).toBeCloseTo(48, 6);
    expect(j.ultimate.omega).toBeCloseTo(2 * Math.SQRT2, 8);
    // PID: Kp = 0.6Ku, Ti = Pu/2, Td = Pu/8 (Ziegler & Nichols 1942, from memory) [R34]
    expect(j.controller.kp).toBeCloseTo(28.8, 6);
    expect(Math.abs(j.controller.ti - 1.1107)).toBeLessThanOrEqual(1e-4);
    expect(Math.abs(j.controller.td - 0.27768)).toBeLessThanOrEqual(1e-5);
  });
  it('--cascade tunes innermost first and reports the separation', async () => {
    const r = await run(['tune', 'heating.loop.json', '--cascade', '--rule', 'simc', '--json']);
    expect(r.code).toBe(0);
    const j = r.json();
    expect(j.steps.map((s: { cut: string }) => s.cut)).toEqual(['cut-supply', 'cut-room']);
    expect(j.separations[0]).toMatchObject({ inner: 'cut-supply', outer: 'cut-room' });
    const text = await run(['tune', 'heating.loop.json', '--cascade', '--rule', 'simc']);
    expect(text.out).toMatch(/separation cut-supply in cut-room: [\d.]+×/);
  });
  it('refuses what it cannot do, naming the flag or the block (exit 2)', async () => {
    expect((await run(['tune', '--model', '1/(s+1)'])).err).toContain('give the rule as --rule');
    expect((await run(['tune', '--model', '1/(s+1)', '--rule', 'fast'])).err).toContain(
      '--rule: "fast" is not one of simc, lambda, amigo, zn-step, zn-ultimate, ms',
    );
    expect((await run(['tune', '--model', '1/(s+1)', '--rule', 'simc', '--cut', 'x'])).err).toContain(
      '--cut and --cascade read a loop of the diagram',
    );
    expect((await run(['tune', '--rule', 'simc'])).err).toContain('give --model');
    const noPid = await run(['tune', 'heating.loop.json', '--rule', 'simc', '--block', 'boiler', '--json']);
    expect(noPid.code).toBe(2);
    expect(noPid.json().error).toMatchObject({
      message: expect.stringContaining('block boiler: a first-order-lag block is no PID controller'),
      at: 'block',
    });
    const noCut = await run(['tune', 'heating.loop.json', '--rule', 'simc', '--cut', 'cut-x']);
    expect(noCut.err).toContain('cut cut-x is not in the diagram (cuts: cut-room, cut-supply)');
  });
  it('text output shows today against the suggestion and the caution', async () => {
    const r = await run(['tune', 'heating.loop.json', '--cut', 'cut-supply', '--rule', 'lambda']);
    expect(r.out).toMatch(/controller: block supply-controller; today kp = 2.5, ti = 90 s/);
    expect(r.out).toMatch(/^ {2}today {6}GM/m);
    expect(r.out).toMatch(/^ {2}suggested {2}GM/m);
    expect(r.out).toMatch(/commission them in small steps/);
  });
});
