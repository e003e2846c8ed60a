import { type MarginFigures, type TransferFunction, loopMargins, marginFigures, tmul } from '@loopwright/lti';
import { type ControllerSetting, DEFAULT_DERIVATIVE_FILTER, controllerTransfer } from './controller.ts';

/**
 * What a suggested setting is predicted to give: the margins of the loop L = C·P (dead time
 * exact) from lti's loopMargins, the same numbers `loopwright margins` prints for that loop.
 * `ms`, `gainMargin`, `phaseMarginDeg`, `delayMargin` are lifted out for tables and the CLI;
 * null where the quantity does not exist (no phase crossover: infinite gain margin).
 */
export interface Prediction {
  ms: number | null;
  gainMargin: number | null;
  phaseMarginDeg: number | null;
  delayMargin: number | null;
  closedLoopStable: boolean;
  margins: MarginFigures;
}

export function predictLoop(c: ControllerSetting, plant: TransferFunction, n = DEFAULT_DERIVATIVE_FILTER): Prediction {
  const m = loopMargins(tmul(controllerTransfer(c, n), plant));
  return {
    ms: m.peakSensitivity,
    gainMargin: m.gainMargin,
    phaseMarginDeg: m.phaseMarginDeg,
    delayMargin: m.delayMargin,
    closedLoopStable: m.closedLoopStable,
    margins: marginFigures(m),
  };
}
