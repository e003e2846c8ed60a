import { beforeEach, describe, expect, it } from 'vitest';
import { supplyLoop, heatingCascade } from '@loopwright/graph';
import { loadDocument, undo, redo, useDiagramStore } from '../store/diagram-store.ts';
import { useAnalysisStore } from '../analysis/analysis-store.ts';
import {
  applyCascade,
  applyTune,
  chooseModel,
  makeBlockFromFit,
  openSampleLog,
  runCascade,
  runTune,
  setColumn,
  setTuneOptions,
  updateBlockFromFit,
  useCommissionStore,
} from './commission-store.ts';

const doc = () => useDiagramStore.getState().diagram;
const past = () => useDiagramStore.temporal.getState().pastStates.length;
const cs = () => useCommissionStore.getState();

// The editor's commissioning actions (common practice, no source: each applied result is one
// undo step and leaves the fit record with the block). Without a Worker the studies run in place.
describe('commissioning in the editor', () => {
  beforeEach(() => loadDocument(JSON.parse(JSON.stringify(supplyLoop))));

  it('the sample test log opens in the Test log view and the three models are fitted', async () => {
    await openSampleLog('supply-valve-bump');
    expect(useAnalysisStore.getState().view).toBe('fit');
    expect(cs().columns!.chosen).toEqual({ time: 'time_s', input: 'valve_pct', output: 'supply_temp_C' });
    expect(cs().fit!.fits.map((f) => [f.model, f.result.ok])).toEqual([
      ['fopdt', true],
      ['sopdt', true],
      ['ipdt', true],
    ]);
    expect(past()).toBe(0);
  });

  it('a bad column choice shows the fit error and keeps the columns to choose from', async () => {
    await openSampleLog('supply-valve-bump');
    await setColumn('output', 'time_s');
    expect(cs().fitError).toContain('time, input and output must be three different columns');
    expect(cs().columns!.columns).toEqual(['time_s', 'valve_pct', 'supply_temp_C']);
    await setColumn('output', 'supply_temp_C');
    expect(cs().fitError).toBeNull();
  });

  it('make a block and update a block: one undo step each, the fit record stored with the block', async () => {
    await openSampleLog('supply-valve-bump');
    chooseModel('sopdt');
    const id = makeBlockFromFit()!;
    expect(past()).toBe(1);
    const sopdt = cs().fit!.fits[1].result;
    expect(doc().blocks.find((b) => b.id === id)!.params.expression).toBe(sopdt.ok ? sopdt.value.expression : null);
    expect(doc().fits!.map((f) => f.block)).toEqual([id]);
    expect(useDiagramStore.getState().selection.blocks).toEqual([id]);
    undo();
    expect(doc().blocks.some((b) => b.id === id)).toBe(false);
    expect(doc().fits ?? []).toEqual([]);
    redo();
    expect(updateBlockFromFit('supply-plant')).toBe(true);
    expect(past()).toBe(2);
    expect(doc().fits!.map((f) => f.block)).toEqual([id, 'supply-plant']);
    // Deleting a block drops its record.
    useDiagramStore.getState().setSelection({ blocks: [id], wires: [] });
    useDiagramStore.getState().deleteSelection();
    expect(doc().fits!.map((f) => f.block)).toEqual(['supply-plant']);
  });

  it('a tuning applied is one undo step and the next suggestion sees it as today', async () => {
    setTuneOptions({ rule: 'simc', controller: 'pi', cut: 'cut-supply' });
    await runTune();
    const t = cs().tune!;
    expect(t.block!.id).toBe('supply-controller');
    expect(applyTune()).toBe(true);
    expect(past()).toBe(1);
    expect(doc().parameters.find((p) => p.name === 'Kp')!.value).toBe(t.controller.kp);
    await runTune();
    expect(cs().tune!.block!.current.kp).toBe(t.controller.kp);
    undo();
    expect(doc().parameters.find((p) => p.name === 'Kp')!.value).toBe(1);
  });

  it('the cascade is applied as one undo step', async () => {
    loadDocument(JSON.parse(JSON.stringify(heatingCascade)));
    setTuneOptions({ rule: 'simc', controller: 'pi', cut: null });
    await runCascade();
    expect(cs().cascade!.steps.map((s) => s.cut)).toEqual(['cut-supply', 'cut-room']);
    expect(applyCascade()).toBe(true);
    expect(past()).toBe(1);
    undo();
    expect(doc()).toEqual(heatingCascade);
  });
});
