import { z } from 'zod';
import { catalogue } from './catalogue/index.ts';
import type { ParamSpec } from './catalogue/types.ts';
import { DIAGRAM_FORMAT, DIAGRAM_VERSION } from './document-types.ts';

/**
 * The zod schema of the current diagram version, built from the block catalogue so that every kind's
 * parameter names and types are part of it (and of the exported JSON Schema). Structural
 * relations (wires pointing at real blocks, unique ids) are not schema matters: they are
 * reported by checkStructure, so that the editor can open a broken diagram and show what is
 * wrong with it.
 */

export const LIMITS = {
  maxBytes: 5 * 1024 * 1024,
  maxBlocks: 2000,
  maxWires: 10000,
  maxParameters: 1000,
  maxCuts: 1000,
  maxSweeps: 200,
  maxTextLength: 10000,
  maxExpressionLength: 2000,
  maxCoordinate: 1e7,
} as const;

const ID_PATTERN = /^[A-Za-z0-9_][A-Za-z0-9_.:-]{0,63}$/;
/**
 * Parameter names are identifiers; not `s` (the Laplace variable), `exp`, words the expression
 * language reserves, or object-internal names.
 */
const NAME_PATTERN =
  /^(?!(?:s|exp|__proto__|constructor|prototype|mod|to|in|and|or|not|xor|true|false|null|undefined|NaN|Infinity)$)[A-Za-z_][A-Za-z0-9_]{0,63}$/;

const idSchema = z
  .string({ error: 'expected an id (a text)' })
  .regex(ID_PATTERN, { error: 'an id is 1–64 letters, digits, "_", ".", ":" or "-", starting with a letter, digit or "_"' });
const nameSchema = z.string({ error: 'expected a parameter name (a text)' }).regex(NAME_PATTERN, {
  error:
    'a parameter name is an identifier (letters, digits, "_", not starting with a digit, at most 64), and not "s", "exp" or a reserved word',
});
const finiteNumber = (what = 'a finite number') => z.number({ error: `expected ${what}` });
const text = (max: number) => z.string({ error: 'expected a text' }).max(max, { error: `longer than ${max} characters` });
const coordinate = finiteNumber()
  .min(-LIMITS.maxCoordinate, { error: `a coordinate must be within ±${LIMITS.maxCoordinate}` })
  .max(LIMITS.maxCoordinate, { error: `a coordinate must be within ±${LIMITS.maxCoordinate}` });

function paramSchema(spec: ParamSpec) {
  switch (spec.type) {
    case 'number':
      return z.union([finiteNumber(), text(LIMITS.maxExpressionLength)], { error: 'expected a number or an expression' });
    case 'expression':
      return text(LIMITS.maxExpressionLength).meta({ description: 'expression in s over the named parameters' });
    case 'choice':
      return z.enum(spec.choices as [string, ...string[]], {
        error: `expected one of ${(spec.choices ?? []).map((c) => `"${c}"`).join(', ')}`,
      });
    case 'text': {
      const t = text(LIMITS.maxTextLength);
      return spec.pattern ? t.regex(spec.pattern, { error: `expected ${spec.patternHint ?? 'a matching text'}` }) : t;
    }
  }
}

export const positionSchema = z.strictObject({ x: coordinate, y: coordinate }, { error: 'expected a position {x, y}' });

const blockVariants = catalogue.map((spec) =>
  z
    .strictObject({
      id: idSchema,
      kind: z.literal(spec.kind),
      label: text(200).optional(),
      position: positionSchema,
      params: z.strictObject(Object.fromEntries(spec.params.map((p) => [p.name, paramSchema(p).optional()]))),
    })
    .meta({ title: spec.title, description: spec.description }),
);

export const blockSchema = z.discriminatedUnion('kind', blockVariants as unknown as [(typeof blockVariants)[0], ...typeof blockVariants], {
  error: `unknown block kind; expected one of ${catalogue.map((s) => `"${s.kind}"`).join(', ')}`,
});

export const portRefSchema = z.strictObject({ block: idSchema, port: text(64) });

export const wireSchema = z.strictObject({ id: idSchema, from: portRefSchema, to: portRefSchema });

export const cutSchema = z.strictObject({ id: idSchema, wire: idSchema, label: text(200).optional() });

const scaleSchema = z.enum(['linear', 'log'], { error: 'expected "linear" or "log"' });

export const sweepSchema = z.strictObject({
  id: idSchema,
  parameter: nameSchema,
  min: finiteNumber(),
  max: finiteNumber(),
  scale: scaleSchema,
  label: text(200).optional(),
});

export const namedParameterSchema = z.strictObject({
  name: nameSchema,
  value: finiteNumber(),
  unit: text(32).optional(),
  min: finiteNumber().optional(),
  max: finiteNumber().optional(),
  scale: scaleSchema.optional(),
  description: text(LIMITS.maxTextLength).optional(),
});

export const viewSchema = z.strictObject({
  zoom: finiteNumber().positive({ error: 'expected a zoom factor above 0' }).max(1000).optional(),
  offset: positionSchema.optional(),
  theme: z.enum(['light', 'dark'], { error: 'expected "light" or "dark"' }).optional(),
  activeCut: idSchema.optional(),
  activeSweep: idSchema.optional(),
  activeProbe: idSchema.optional(),
});

const tolerance = finiteNumber()
  .positive({ error: 'expected a tolerance above 0' })
  .max(0.1, { error: 'a tolerance above 0.1 would make the run meaningless' });

export const simulationSchema = z.strictObject({
  end: finiteNumber().positive({ error: 'expected a duration above 0 s' }).max(1e9).optional(),
  rtol: tolerance.optional(),
  atol: tolerance.optional(),
  probes: z.array(idSchema, { error: 'expected a list of probe ids' }).max(LIMITS.maxBlocks).optional(),
});

const interval = z.union([z.tuple([finiteNumber(), finiteNumber()], { error: 'expected an interval [low, high]' }), z.null()], {
  error: 'expected an interval [low, high] or null',
});
const row = z.union([z.int({ error: 'expected a row number' }).min(1), z.null()], { error: 'expected a row number or null' });

/** Where a block's fitted model came from (version 3): see FitRecord in document-types.ts. */
export const fitRecordSchema = z.strictObject({
  block: idSchema,
  source: z.strictObject({
    fileName: z.union([text(1000), z.null()], { error: 'expected a file name or null' }),
    sha256: z.union([z.string().regex(/^[0-9a-f]{64}$/, { error: 'expected 64 lower-case hex digits' }), z.null()], {
      error: 'expected a SHA-256 (64 hex digits) or null',
    }),
    columns: z.strictObject({ time: text(200), input: text(200), output: text(200) }),
    samples: z.int({ error: 'expected a whole number of samples' }).min(0),
    firstRow: row,
    lastRow: row,
  }),
  model: z.strictObject({
    kind: z.enum(['fopdt', 'sopdt', 'ipdt'], { error: 'expected "fopdt", "sopdt" or "ipdt"' }),
    gain: finiteNumber(),
    timeConstants: z
      .array(finiteNumber().positive({ error: 'expected a time constant above 0 s' }))
      .max(2, { error: 'at most two time constants' }),
    deadTime: finiteNumber().min(0, { error: 'expected a dead time ≥ 0 s' }),
  }),
  expression: text(LIMITS.maxExpressionLength),
  quality: z.strictObject({
    nrmse: finiteNumber().min(0),
    rmse: finiteNumber().min(0),
    confidence: finiteNumber().positive().max(1),
  }),
  intervals: z.strictObject({ gain: interval, timeConstants: z.array(interval).max(2), deadTime: interval }),
  method: z.strictObject({
    between: z.enum(['linear', 'hold'], { error: 'expected "linear" or "hold"' }),
    operatingPoint: z.strictObject({ input: finiteNumber(), output: finiteNumber(), samples: z.int().min(0) }),
  }),
  fittedAt: z.string().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z$/, { error: 'expected an ISO 8601 UTC date-time' }),
});

const tooMany = (n: number, what: string) => ({ error: `more than ${n} ${what}: refused (split the diagram)` });

export const diagramSchema = z
  .strictObject({
    format: z.literal(DIAGRAM_FORMAT, { error: `expected "${DIAGRAM_FORMAT}"` }),
    version: z.literal(DIAGRAM_VERSION, { error: `expected ${DIAGRAM_VERSION}` }),
    title: text(200),
    description: text(LIMITS.maxTextLength),
    parameters: z
      .array(namedParameterSchema, { error: 'expected a list' })
      .max(LIMITS.maxParameters, tooMany(LIMITS.maxParameters, 'named parameters')),
    blocks: z.array(blockSchema, { error: 'expected a list' }).max(LIMITS.maxBlocks, tooMany(LIMITS.maxBlocks, 'blocks')),
    wires: z.array(wireSchema, { error: 'expected a list' }).max(LIMITS.maxWires, tooMany(LIMITS.maxWires, 'wires')),
    cuts: z.array(cutSchema, { error: 'expected a list' }).max(LIMITS.maxCuts, tooMany(LIMITS.maxCuts, 'cuts')),
    sweeps: z.array(sweepSchema, { error: 'expected a list' }).max(LIMITS.maxSweeps, tooMany(LIMITS.maxSweeps, 'sweeps')),
    simulation: simulationSchema.optional(),
    fits: z.array(fitRecordSchema, { error: 'expected a list' }).max(LIMITS.maxBlocks, tooMany(LIMITS.maxBlocks, 'fit records')).optional(),
    view: viewSchema,
  })
  .meta({
    title: 'Loopwright diagram',
    description: 'A Loopwright block diagram (.loop.json), format version ' + DIAGRAM_VERSION + '.',
  });

/** The JSON Schema of the document, generated from the zod schema (committed as schema/diagram.schema.json). */
export function diagramJsonSchema(): Record<string, unknown> {
  return z.toJSONSchema(diagramSchema, { target: 'draft-2020-12' }) as Record<string, unknown>;
}

/** The committed text of schema/diagram.schema.json (2-space indent, trailing newline). */
export const diagramJsonSchemaText = (): string => JSON.stringify(diagramJsonSchema(), null, 2) + '\n';
