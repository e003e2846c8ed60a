import { compileModel, simulate, tracesCsv, type SimResult } from '@loopwright/sim';
import { all, has, numberFlag, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, type Command } from '../io.ts';
import { readDiagram } from './diagram-input.ts';

const help = `loopwright simulate FILE [--until T] [--set NAME=VALUE ...] [--csv OUT.csv] [--json]

Time-simulates a diagram (.loop.json) from rest: saturation, rate limits, dead zones, dead time
and PID output limits with anti-windup as drawn. Prints the run's outcome, the response figures
of every probe and the actuator figures of every limiting block.

  --until T          end time in seconds (default: the diagram's simulation end, else 10)
  --set NAME=VALUE   use VALUE for the named parameter NAME (repeatable)
  --csv OUT.csv      write the traces: a header row "time,<probe>,..." then one row per output time
  --json             print traces, events, metrics and actuator figures as JSON
  --step DT          output grid spacing in seconds (default T/1000); event times are added
  --rtol R, --atol A integrator tolerances (default 1e-6 and 1e-9)
  --linear           replace every nonlinearity by its linear form (for an overlay)
  --wire ID          also record wire ID as a trace "wire:ID" (repeatable; "all" for every wire)
  --max-steps N      step budget (default 200000)

Exit code 0 when the run completes, 1 when it stops early (diverged, stiff, budget: the
message names the cause and the time reached; the partial traces are still written),
2 for bad input.
`;

const fmt = (v: number | null | undefined, unit = '') =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : `${+v.toPrecision(5)}${unit}`;

function summary(file: string, res: SimResult): string {
  const out: string[] = [`${file}: ${res.status} — ${res.message}`];
  out.push(`  ${res.stats.accepted} steps, ${res.stats.segments} segments, ${res.events.length} events, ${fmt(res.stats.wallMs)} ms`);
  for (const [id, m] of Object.entries(res.metrics)) {
    if (!m) {
      out.push(`  probe ${id}: no figures (trace not measurable)`);
      continue;
    }
    out.push(
      `  probe ${id}: final ${fmt(m.steadyState)}, rise ${fmt(m.riseTime, ' s')}, overshoot ${fmt(m.overshootPct, ' %')}` +
        ` (peak ${fmt(m.peak)} at ${fmt(m.peakTime, ' s')}), settling ${fmt(m.settlingTime, ' s')}, IAE ${fmt(m.iae)}`,
    );
  }
  for (const [id, a] of Object.entries(res.actuators)) {
    out.push(`  actuator ${id}: at a limit ${fmt(a.timeInSaturation, ' s')}, ${a.limitHits} limit hits, peak effort ${fmt(a.peakEffort)}`);
  }
  return out.join('\n') + '\n';
}

export const simulateCommand: Command = {
  name: 'simulate',
  summary: 'time-simulate a diagram (saturation, rate limits, dead time, anti-windup)',
  help,
  async run(argv, io) {
    const args = parseArgs(argv, ['until', 'set', 'csv', 'step', 'rtol', 'atol', 'wire', 'max-steps'], ['json', 'linear']);
    if (args.positional.length !== 1) throw new UsageError('simulate needs exactly one FILE (see loopwright simulate --help)');
    const file = args.positional[0];
    const overrides = parseAssignments(all(args, 'set'), 'set');
    const diagram = await readDiagram(io, file);
    const until = numberFlag(args, 'until') ?? diagram.simulation?.end ?? 10;
    if (!(until > 0)) throw new UsageError(`--until: ${until} must be above 0 s`);
    for (const name of Object.keys(overrides)) {
      if (!diagram.parameters.some((p) => p.name === name)) {
        throw new UsageError(`--set ${name}: the diagram has no parameter "${name}" (parameters: ${diagram.parameters.map((p) => p.name).join(', ') || 'none'})`);
      }
    }
    const wireFlags = all(args, 'wire');
    const wires = wireFlags.includes('all') ? ('all' as const) : wireFlags;
    const maxSteps = numberFlag(args, 'max-steps');
    const model = compileModel(diagram);
    const res = simulate(model, {
      until,
      overrides,
      outputStep: numberFlag(args, 'step'),
      rtol: numberFlag(args, 'rtol'),
      atol: numberFlag(args, 'atol'),
      linear: has(args, 'linear'),
      wires,
      maxSteps,
    });
    const csv = all(args, 'csv');
    if (csv.length > 1) throw new UsageError('flag --csv given more than once');
    if (csv.length === 1) await io.writeFile(csv[0], tracesCsv(res));
    if (has(args, 'json')) {
      io.stdout(
        toJson({
          file,
          status: res.status,
          message: res.message,
          timeReached: res.timeReached,
          metrics: res.metrics,
          actuators: res.actuators,
          events: res.events,
          stats: res.stats,
          time: res.time,
          traces: res.traces,
        }),
      );
    } else {
      io.stdout(summary(file, res));
      if (csv.length === 1) io.stdout(`  traces written to ${csv[0]} (${res.time.length} rows)\n`);
    }
    if (res.status !== 'ok') {
      io.stderr(`loopwright simulate: ${res.message}\n`);
      return 1;
    }
    return 0;
  },
};
