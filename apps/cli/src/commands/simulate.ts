import { tracesCsv } from '@loopwright/sim';
import { runStudy, type ResponseResult } from '@loopwright/study';
import { all, has, numberFlag, parseArgs, parseAssignments, toJson } from '../args.ts';
import { UsageError, WriteError, type Command } from '../io.ts';
import { checkSets, readDiagram } from './diagram-input.ts';

const help = `loopwright simulate FILE [--until T] [--set NAME=VALUE ...] [--csv OUT.csv] [--json]

Time-simulates a diagram (.loop.json; "-" reads standard input) from rest: saturation, rate
limits, dead zones, dead time and PID output limits with anti-windup as drawn. Prints the run's
outcome, the response figures of the probes shown and the actuator figures of every limiting
block. The diagram's simulation settings (end time, tolerances, probes shown) are used; the
flags below override them.

  --until T          end time in seconds (default: the diagram's simulation end time, else long
                     enough for the slowest closed-loop mode to settle)
  --set NAME=VALUE   use VALUE for the named parameter NAME (repeatable)
  --csv OUT.csv      write the traces: a header row "time,<probe>,..." (every probe, then the
                     wires asked for) then one row per output time
  --json             print traces, events, metrics and actuator figures as JSON
  --step DT          output grid spacing in seconds (default T/1000); event times are added
  --rtol R, --atol A integrator tolerances (default: the diagram's, else 1e-6 and 1e-9)
  --linear           replace every nonlinearity by its linear form (for an overlay)
  --wire ID          also record wire ID as a trace "wire:ID" (repeatable; "all" for every wire)
  --probe ID         show probe ID in the summary (repeatable; "all" for every probe; default:
                     the diagram's probes shown, else every probe)
  --max-steps N      step budget (default 200000)

Exit code 0 when the run completes, 1 when it stops early (diverged, stiff, budget: the
message names the cause and the time reached; the partial traces are still written),
2 for bad input or a CSV file that cannot be written (the summary is still printed).
`;

const fmt = (v: number | null | undefined, unit = '') =>
  v === null || v === undefined || !Number.isFinite(v) ? '—' : `${+v.toPrecision(5)}${unit}`;

function summary(file: string, res: ResponseResult): string {
  const r = res.run;
  const from = { request: 'given', diagram: "the diagram's", automatic: 'chosen from the slowest closed-loop pole' }[
    res.settings.untilFrom
  ];
  const out: string[] = [`${file}: ${r.status} — ${r.message}`];
  out.push(
    `  end time ${fmt(res.settings.until, ' s')} (${from}), rtol ${res.settings.rtol}, atol ${res.settings.atol}${res.model === 'linear' ? ', linear model' : ''}`,
  );
  out.push(`  ${r.stats.accepted} steps, ${r.stats.segments} segments, ${r.events.length} events, ${fmt(r.stats.wallMs)} ms`);
  for (const id of res.shownProbes) {
    const m = r.probeFigures[id];
    if (!m) {
      out.push(`  probe ${id}: no figures (trace not measurable)`);
      continue;
    }
    out.push(
      `  probe ${id}: final ${fmt(m.steadyState)}, rise ${fmt(m.riseTime, ' s')}, overshoot ${fmt(m.overshootPct, ' %')}` +
        ` (peak ${fmt(m.peak)} at ${fmt(m.peakTime, ' s')}), settling ${fmt(m.settlingTime, ' s')}, IAE ${fmt(m.iae)}`,
    );
  }
  for (const [id, a] of Object.entries(r.actuatorFigures)) {
    out.push(`  actuator ${id}: at a limit ${fmt(a.timeInSaturation, ' s')}, ${a.limitHits} limit hits, peak effort ${fmt(a.peakEffort)}`);
  }
  return out.join('\n') + '\n';
}

export const simulateCommand: Command = {
  name: 'simulate',
  summary: 'time-simulate a diagram (saturation, rate limits, dead time, anti-windup)',
  help,
  async run(argv, io, budget = {}) {
    const args = parseArgs(argv, ['until', 'set', 'csv', 'step', 'rtol', 'atol', 'wire', 'probe', 'max-steps'], ['json', 'linear']);
    if (args.positional.length !== 1) throw new UsageError('simulate needs exactly one FILE (see loopwright simulate --help)');
    const file = args.positional[0];
    const overrides = parseAssignments(all(args, 'set'), 'set');
    const csv = all(args, 'csv');
    if (csv.length > 1) throw new UsageError('flag --csv given more than once', '--csv');
    const diagram = await readDiagram(io, file);
    checkSets(diagram, overrides);
    const until = numberFlag(args, 'until');
    if (until !== undefined && !(until > 0)) throw new UsageError(`--until: ${until} must be above 0 s`, '--until');
    const wireFlags = all(args, 'wire');
    const probeFlags = all(args, 'probe');
    const res = runStudy(
      diagram,
      {
        kind: 'run',
        overrides,
        until: until ?? null,
        ...optional('step', numberFlag(args, 'step')),
        ...optional('rtol', numberFlag(args, 'rtol')),
        ...optional('atol', numberFlag(args, 'atol')),
        ...optional('maxSteps', numberFlag(args, 'max-steps')),
        model: has(args, 'linear') ? 'linear' : 'as-drawn',
        wires: wireFlags.includes('all') ? 'all' : wireFlags,
        ...(probeFlags.length ? { probes: probeFlags.includes('all') ? ('all' as const) : probeFlags } : {}),
      },
      budget,
    );
    // Data out: every probe and the wires asked for (actuator signals only when asked for).
    const keep = new Set([
      ...res.probes.map((p) => p.id),
      ...(wireFlags.includes('all') ? Object.keys(res.run.traces).filter((k) => k.startsWith('wire:')) : wireFlags.map((w) => `wire:${w}`)),
    ]);
    const traces = Object.fromEntries(Object.entries(res.run.traces).filter(([k]) => keep.has(k)));
    let writeError: WriteError | null = null;
    if (csv.length === 1) {
      try {
        await io.writeFile(csv[0], tracesCsv({ time: res.run.time, traces }));
      } catch (err) {
        const why = (err as { code?: string }).code ?? (err instanceof Error ? err.message : String(err));
        writeError = new WriteError(`cannot write the traces to ${csv[0]}: ${why}`, csv[0]);
      }
    }
    const r = res.run;
    if (has(args, 'json')) {
      io.stdout(
        toJson({
          file,
          status: r.status,
          message: r.message,
          timeReached: r.timeReached,
          settings: res.settings,
          shownProbes: res.shownProbes,
          metrics: r.probeFigures,
          actuators: r.actuatorFigures,
          events: r.events,
          stats: r.stats,
          time: r.time,
          traces,
          ...(writeError ? { error: { message: writeError.message, at: writeError.at } } : {}),
        }),
      );
    } else {
      io.stdout(summary(file, res));
      if (csv.length === 1 && !writeError) io.stdout(`  traces written to ${csv[0]} (${r.time.length} rows)\n`);
    }
    if (writeError) {
      io.stderr(`loopwright simulate: ${writeError.message}\n`);
      return 2;
    }
    if (r.status !== 'ok') {
      io.stderr(`loopwright simulate: ${r.message}\n`);
      return 1;
    }
    return 0;
  },
};

const optional = <K extends string>(key: K, v: number | undefined): Partial<Record<K, number>> =>
  v === undefined ? {} : ({ [key]: v } as Record<K, number>);
