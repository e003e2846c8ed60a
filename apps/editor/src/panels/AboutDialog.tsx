/** About & safety: what Loopwright is, and the caution that goes with its results. */
import { useModalDialog } from './use-modal.ts';
import { useUiStore } from '../store/ui-store.ts';

export const SAFETY_TEXT =
  'Results are design aids. Where a loop drives machinery, heat or pressure, validate on the real plant with limits and interlocks in place, and defer to the applicable functional-safety standards, local codes and licensed practice.';

export function AboutDialog() {
  const ref = useModalDialog(useUiStore((s) => s.aboutOpen));
  return (
    <dialog ref={ref} className="about" aria-label="About and safety" onClose={() => useUiStore.getState().setAboutOpen(false)}>
      <h2>Loopwright</h2>
      <p>
        A workbench for tuning cascaded and multi-loop feedback systems: wire the loops as a diagram, cut any wire to read its margins with
        the other loops closed, sweep one parameter and watch every closed-loop pole move, and simulate with saturation, rate limits and
        dead time.
      </p>
      <h3>Safety</h3>
      <p className="safety" role="note">
        {SAFETY_TEXT}
      </p>
      <h3>Keys</h3>
      <ul className="small">
        <li>Delete — remove the selection · Ctrl+A — select all · Ctrl+C / Ctrl+V — copy / paste</li>
        <li>Ctrl+Z — undo · Ctrl+Shift+Z or Ctrl+Y — redo · Ctrl+S — save</li>
        <li>Shift+drag — box select · Ctrl+click — add to the selection</li>
      </ul>
      <form method="dialog">
        <button type="submit" aria-label="Close About">
          Close
        </button>
      </form>
    </dialog>
  );
}
