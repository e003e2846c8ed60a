/**
 * Poles or zeros as a table: each (a conjugate pair once) with ζ, ωn and how it was found —
 * exact, or through a Padé approximant (an approximated true root, or an artefact of the
 * approximation). The Locus list and the Closed loop view show them alike.
 */
import { ORIGIN_TEXT, dampingOf, type Cx, type PoleOrigin } from '@loopwright/study';
import { fmt } from '../analysis/sweep.ts';

export function RootsTable({
  title,
  roots,
  origin,
  testId,
}: {
  title: string;
  roots: readonly Cx[];
  origin: readonly PoleOrigin[];
  testId: string;
}) {
  const shown = roots.map((p, i) => ({ p, o: origin[i] ?? 'exact' })).filter(({ p }) => p.im >= 0);
  return (
    <table className="lw-table lw-compact" data-testid={testId}>
      <thead>
        <tr>
          <th>{title}</th>
          <th>ζ</th>
          <th>ωn [rad/s]</th>
          <th>how it was found</th>
        </tr>
      </thead>
      <tbody>
        {shown.length === 0 && (
          <tr>
            <td colSpan={4} className="lw-muted">
              none
            </td>
          </tr>
        )}
        {shown.map(({ p, o }, i) => {
          const z = dampingOf(p);
          return (
            <tr key={i} data-origin={o} className={o === 'approximant' ? 'lw-artefact' : undefined}>
              <td>{p.im > 0 ? `${fmt(p.re)} ± j${fmt(p.im)}` : fmt(p.re)}</td>
              <td>{fmt(z.zeta, 3)}</td>
              <td>{fmt(z.omegaN)}</td>
              <td>{ORIGIN_TEXT[o]}</td>
            </tr>
          );
        })}
      </tbody>
    </table>
  );
}
