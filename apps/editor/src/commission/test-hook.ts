/**
 * `window.__loopwright.commission`: what the Test log and Tune views hold (the log's text left
 * out), for browser tests and the devtools console.
 */
import { useCommissionStore } from './commission-store.ts';

export interface CommissionHook {
  state(): unknown;
}

export function installCommissionHook(): void {
  const hook: CommissionHook = {
    state() {
      const s = useCommissionStore.getState();
      return JSON.parse(JSON.stringify({ ...s, log: s.log ? { fileName: s.log.fileName, length: s.log.text.length } : null }));
    },
  };
  const w = window as unknown as { __loopwright?: Record<string, unknown> };
  w.__loopwright = w.__loopwright ?? {};
  w.__loopwright.commission = hook;
}
