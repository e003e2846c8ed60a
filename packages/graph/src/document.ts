import { InputError } from '@loopwright/lti';
import { blockSpec, isBlockKind } from './catalogue/index.ts';
import { DIAGRAM_FORMAT, DIAGRAM_VERSION, type Diagram, type FitRecord } from './document-types.ts';
import { LIMITS, diagramSchema } from './schema.ts';

/**
 * Reading and writing `.loop.json`: size limits, a guard against object-internal keys, version
 * migration, zod validation with messages that name the block, wire or field at fault, and a
 * serialiser with a fixed key order (loading then saving an unchanged document gives the same
 * bytes).
 */

/** An InputError for a diagram that does not load; `problems` lists every problem found (the message shows the first few). */
export class DiagramError extends InputError {
  override name = 'DiagramError';
  constructor(
    message: string,
    readonly problems: string[] = [message],
    details: { position?: number; field?: string; length?: number } = {},
  ) {
    super(message, details);
  }
}

/** Keys that could reach Object.prototype when copied about; refused anywhere in a document. */
const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype']);
const MAX_DEPTH = 64;

type Json = unknown;
const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

// ---------------------------------------------------------------------------------------------
// Paths in messages: blocks[3] (id "pid1").params.kp

function pathLabel(root: Json, path: readonly PropertyKey[]): string {
  let out = '';
  let node: Json = root;
  let parentKey: PropertyKey | undefined;
  for (const seg of path) {
    if (typeof seg === 'number') {
      out += `[${seg}]`;
      node = Array.isArray(node) ? node[seg] : undefined;
      if (isObject(node)) {
        if (parentKey === 'parameters' && typeof node.name === 'string') out += ` (name ${JSON.stringify(node.name.slice(0, 64))})`;
        else if (typeof node.id === 'string' && parentKey !== 'parameters') out += ` (id ${JSON.stringify(node.id.slice(0, 64))})`;
      }
    } else {
      const key = String(seg);
      out += out === '' ? key : `.${key}`;
      node = isObject(node) ? node[key] : undefined;
    }
    parentKey = seg;
  }
  return out === '' ? 'document' : out;
}

function valueAt(root: Json, path: readonly PropertyKey[]): { found: boolean; value: unknown } {
  let node: Json = root;
  for (const seg of path) {
    if (typeof seg === 'number' ? !Array.isArray(node) : !isObject(node)) return { found: false, value: undefined };
    const container = node as Record<PropertyKey, unknown>;
    if (!Object.prototype.hasOwnProperty.call(container, seg)) return { found: false, value: undefined };
    node = container[seg];
  }
  return { found: true, value: node };
}

export function describeValue(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  switch (typeof v) {
    case 'string':
      return v.length > 40 ? `${JSON.stringify(v.slice(0, 40))}…` : JSON.stringify(v);
    case 'number':
    case 'boolean':
      return String(v);
    case 'object':
      return 'an object';
    default:
      return typeof v;
  }
}

interface ZodLikeIssue {
  code: string;
  path: PropertyKey[];
  message: string;
  keys?: string[];
  maximum?: number | bigint;
  minimum?: number | bigint;
  expected?: string;
}

const TYPE_NAMES: Record<string, string> = {
  object: 'an object',
  array: 'a list',
  number: 'a number',
  string: 'a text',
  boolean: 'true or false',
};
const typeName = (t: string | undefined) => (t ? (TYPE_NAMES[t] ?? t) : 'another type');
/** A path to one element of `blocks` (where a failed kind match means "not a block"). */
const path2kind = (path: readonly PropertyKey[]) => path.length === 2 && path[0] === 'blocks' && typeof path[1] === 'number';

const isDefaultMessage = (m: string) => /^(Invalid input|Invalid option|Too big|Too small|Invalid|Unrecognized key)/.test(m);

function knownFieldsAt(root: Json, path: readonly PropertyKey[]): string | null {
  // params object of a block: list the kind's parameter names
  if (path.length === 3 && path[0] === 'blocks' && path[2] === 'params') {
    const block = valueAt(root, path.slice(0, 2)).value;
    if (isObject(block) && isBlockKind(block.kind)) {
      const names = blockSpec(block.kind).params.map((p) => p.name);
      return names.length ? `a ${block.kind} block has ${names.join(', ')}` : `a ${block.kind} block has no parameters`;
    }
  }
  return null;
}

function formatIssue(root: Json, issue: ZodLikeIssue): string[] {
  if (issue.code === 'unrecognized_keys') {
    const known = knownFieldsAt(root, issue.path);
    return (issue.keys ?? []).map((k) => `${pathLabel(root, [...issue.path, k])}: unknown field${known ? ` (${known})` : ''}`);
  }
  const where = pathLabel(root, issue.path);
  const { found, value } = valueAt(root, issue.path);
  if (!found) {
    const what = isDefaultMessage(issue.message) ? (issue.expected ? `expected ${typeName(issue.expected)}` : 'required') : issue.message;
    return [`${where}: missing (${what})`];
  }
  let msg: string;
  if (path2kind(issue.path) && !isObject(value)) {
    msg = `expected a block (an object), got ${describeValue(value)}`;
  } else if (issue.code === 'too_big' && isDefaultMessage(issue.message)) {
    msg =
      typeof value === 'string' ? `longer than ${issue.maximum} characters` : `${describeValue(value)} is above the limit ${issue.maximum}`;
  } else if (issue.code === 'too_small' && isDefaultMessage(issue.message)) {
    msg = `${describeValue(value)} is below the limit ${issue.minimum}`;
  } else if (issue.code === 'invalid_type' && isDefaultMessage(issue.message)) {
    msg = `expected ${typeName(issue.expected)}, got ${describeValue(value)}`;
  } else if ((issue.code === 'too_big' || issue.code === 'too_small') && typeof value !== 'number') {
    msg = issue.message;
  } else {
    msg = `${issue.message}, got ${describeValue(value)}`;
  }
  return [`${where}: ${msg}`];
}

function failure(problems: string[], note = '', field?: string): DiagramError {
  const shown = problems.slice(0, 3).join('; ');
  const more = problems.length > 3 ? `; and ${problems.length - 3} more` : '';
  return new DiagramError(
    `diagram does not load: ${shown}${more}${note}`,
    problems.map((p) => p + note),
    field ? { field } : {},
  );
}

// ---------------------------------------------------------------------------------------------
// Guards before validation

/** Refuses object-internal keys and absurd nesting, iteratively (no recursion to overflow). */
function scanKeys(root: Json): void {
  // Paths are rebuilt from parent links only when something is refused (keeps the scan cheap).
  interface Entry {
    node: object;
    key: PropertyKey;
    parent: Entry | null;
    depth: number;
  }
  const pathOf = (e: Entry | null): PropertyKey[] => {
    const out: PropertyKey[] = [];
    for (let x = e; x && x.parent; x = x.parent) out.unshift(x.key);
    return out;
  };
  const stack: Entry[] = [{ node: root as object, key: '', parent: null, depth: 0 }];
  while (stack.length) {
    const e = stack.pop()!;
    if (e.depth > MAX_DEPTH) throw failure([`${pathLabel(root, pathOf(e).slice(0, 8))}…: nested deeper than ${MAX_DEPTH} levels`]);
    const node = e.node;
    if (Array.isArray(node)) {
      for (let i = 0; i < node.length; i++) {
        const c = node[i];
        if (typeof c === 'object' && c !== null) stack.push({ node: c, key: i, parent: e, depth: e.depth + 1 });
      }
    } else {
      for (const key of Object.keys(node)) {
        if (FORBIDDEN_KEYS.has(key)) {
          throw failure([`${pathLabel(root, [...pathOf(e), key])}: the key "${key}" is not allowed in a diagram`], '', key);
        }
        const c = (node as Record<string, unknown>)[key];
        if (typeof c === 'object' && c !== null) stack.push({ node: c, key, parent: e, depth: e.depth + 1 });
      }
    }
  }
}

// ---------------------------------------------------------------------------------------------
// Versions

/**
 * Version 0 (the first file shape): no cuts, sweeps or view, and a block's parameters under
 * `parameters` instead of `params`. Upgraded by renaming and adding the empty collections.
 */
function migrateV0(doc: Record<string, unknown>): Record<string, unknown> {
  const { blocks, description, parameters, ...rest } = doc;
  return {
    ...rest,
    version: 1,
    description: description ?? '',
    parameters: parameters ?? [],
    blocks: Array.isArray(blocks)
      ? blocks.map((b) => {
          if (!isObject(b) || !('parameters' in b) || 'params' in b) return b;
          const { parameters: p, ...others } = b;
          return { ...others, params: p };
        })
      : blocks,
    cuts: [],
    sweeps: [],
    view: {},
  };
}

/**
 * Version 1 kept the run's end time in the view (`view.simulationEnd`). Version 2 gives the
 * simulation its own settings (end time, tolerances, probes shown), so the end time moves there.
 */
function migrateV1(doc: Record<string, unknown>): Record<string, unknown> {
  const out: Record<string, unknown> = { ...doc, version: 2 };
  const view = doc.view;
  if (isObject(view) && 'simulationEnd' in view) {
    const { simulationEnd, ...rest } = view;
    out.view = rest;
    out.simulation = { end: simulationEnd };
  } else {
    out.simulation = {};
  }
  return out;
}

/**
 * Version 3 may keep the provenance of fitted models (`fits`). A version-2 file has none, so it
 * upgrades by its number alone; an older Loopwright refuses a version-3 file as newer instead of
 * calling `fits` an unknown field.
 */
const migrateV2 = (doc: Record<string, unknown>): Record<string, unknown> => ({ ...doc, version: 3 });

const MIGRATIONS: Record<number, (doc: Record<string, unknown>) => Record<string, unknown>> = { 0: migrateV0, 1: migrateV1, 2: migrateV2 };

function upgrade(doc: Record<string, unknown>): { doc: Record<string, unknown>; from: number } {
  if (doc.format !== DIAGRAM_FORMAT) {
    throw failure([
      `format: ${'format' in doc ? describeValue(doc.format) : 'missing'}: this is not a Loopwright diagram (expected "format": "${DIAGRAM_FORMAT}")`,
    ]);
  }
  const v = doc.version;
  if (typeof v !== 'number' || !Number.isInteger(v) || v < 0) {
    throw failure([
      `version: ${'version' in doc ? describeValue(v) : 'missing'}: expected a whole number (this Loopwright reads versions 0 to ${DIAGRAM_VERSION})`,
    ]);
  }
  if (v > DIAGRAM_VERSION) {
    throw failure([
      `version: the diagram was written by a newer Loopwright (format version ${v}); this one reads versions up to ${DIAGRAM_VERSION}: update Loopwright to open it`,
    ]);
  }
  let out = doc;
  for (let k = v; k < DIAGRAM_VERSION; k++) out = MIGRATIONS[k](out);
  return { doc: out, from: v };
}

// ---------------------------------------------------------------------------------------------
// Public API

/**
 * Validates a parsed JSON value (or an object from the editor) into a Diagram: refuses
 * object-internal keys, migrates older versions, refuses newer ones and oversized diagrams,
 * and checks the shape with the zod schema. Throws DiagramError (an InputError) naming the
 * block, wire or field at fault. The result is a fresh object tree.
 */
export function validateDiagram(value: unknown): Diagram {
  if (!isObject(value)) throw failure([`document: expected a JSON object, got ${describeValue(value)}`]);
  scanKeys(value);
  const { doc, from } = upgrade(value);
  const note = from < DIAGRAM_VERSION ? ` (after upgrading the document from version ${from} to ${DIAGRAM_VERSION})` : '';
  if (Array.isArray(doc.blocks) && doc.blocks.length > LIMITS.maxBlocks) {
    throw failure([`blocks: ${doc.blocks.length} blocks: more than ${LIMITS.maxBlocks} is refused (split the diagram)`]);
  }
  const result = diagramSchema.safeParse(doc);
  if (!result.success) {
    const problems = result.error.issues.flatMap((i) => formatIssue(doc, i as unknown as ZodLikeIssue));
    throw failure(problems, note, pathLabel(doc, result.error.issues[0].path as PropertyKey[]));
  }
  return result.data as unknown as Diagram;
}

function utf8Length(text: string): number {
  let n = 0;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c < 0x80) n += 1;
    else if (c < 0x800) n += 2;
    else if (c >= 0xd800 && c <= 0xdbff) {
      n += 4;
      i++;
    } else n += 3;
  }
  return n;
}

/** Parses `.loop.json` text into a Diagram (see validateDiagram). */
export function parseDiagram(jsonText: string): Diagram {
  if (typeof jsonText !== 'string') throw failure([`document: expected JSON text, got ${typeof jsonText}`]);
  if (jsonText.length > LIMITS.maxBytes || utf8Length(jsonText) > LIMITS.maxBytes) {
    throw failure([`document: larger than ${LIMITS.maxBytes / (1024 * 1024)} MB: refused`]);
  }
  let raw: unknown;
  try {
    raw = JSON.parse(jsonText);
  } catch (err) {
    const msg = err instanceof Error ? err.message : String(err);
    const m = /position (\d+)/.exec(msg);
    const position = m ? Number(m[1]) : undefined;
    throw new DiagramError(
      `diagram does not load: not valid JSON: ${msg}`,
      [`not valid JSON: ${msg}`],
      position !== undefined ? { position, length: 1 } : {},
    );
  }
  return validateDiagram(raw);
}

/** A new diagram with nothing in it. */
export function emptyDiagram(title = 'Untitled diagram'): Diagram {
  return {
    format: DIAGRAM_FORMAT,
    version: DIAGRAM_VERSION,
    title,
    description: '',
    parameters: [],
    blocks: [],
    wires: [],
    cuts: [],
    sweeps: [],
    simulation: {},
    view: {},
  };
}

// ---------------------------------------------------------------------------------------------
// Serialisation with a fixed key order

type Plain = { [k: string]: unknown };

function pick(src: object | undefined, keys: readonly string[], path: string): Plain {
  const out: Plain = {};
  if (!src) return out;
  const s = src as Plain;
  for (const k of keys) {
    const v = s[k];
    if (v === undefined) continue;
    if (typeof v === 'number' && !Number.isFinite(v)) {
      throw new InputError(`${path}.${k}: ${v} cannot be saved (JSON has no such number)`, { field: `${path}.${k}` });
    }
    out[k] = v;
  }
  return out;
}

const xy = (p: { x: number; y: number } | undefined, path: string) => (p ? pick(p, ['x', 'y'], path) : undefined);

/** A fit record with its keys in the order of document-types.ts. */
function serializeFit(f: FitRecord, path: string): Plain {
  return {
    block: f.block,
    source: {
      ...pick(f.source, ['fileName', 'sha256'], `${path}.source`),
      columns: pick(f.source.columns, ['time', 'input', 'output'], `${path}.source.columns`),
      ...pick(f.source, ['samples', 'firstRow', 'lastRow'], `${path}.source`),
    },
    model: pick(f.model, ['kind', 'gain', 'timeConstants', 'deadTime'], `${path}.model`),
    expression: f.expression,
    quality: pick(f.quality, ['nrmse', 'rmse', 'confidence'], `${path}.quality`),
    intervals: pick(f.intervals, ['gain', 'timeConstants', 'deadTime'], `${path}.intervals`),
    method: {
      between: f.method.between,
      operatingPoint: pick(f.method.operatingPoint, ['input', 'output', 'samples'], `${path}.method.operatingPoint`),
    },
    fittedAt: f.fittedAt,
  };
}

/**
 * The document as `.loop.json` text: keys in a fixed order (the order of document-types.ts;
 * block parameters in the catalogue's order), 2-space indent, trailing newline.
 */
export function serializeDiagram(d: Diagram): string {
  const doc: Plain = {
    format: d.format,
    version: d.version,
    title: d.title,
    description: d.description,
    parameters: d.parameters.map((p, i) => pick(p, ['name', 'value', 'unit', 'min', 'max', 'scale', 'description'], `parameters[${i}]`)),
    blocks: d.blocks.map((b, i) => {
      const path = `blocks[${i}] (id "${b.id}")`;
      const order = isBlockKind(b.kind) ? blockSpec(b.kind).params.map((p) => p.name) : [];
      const extra = Object.keys(b.params ?? {})
        .filter((k) => !order.includes(k))
        .sort();
      return {
        ...pick(b, ['id', 'kind', 'label'], path),
        position: xy(b.position, `${path}.position`),
        params: pick(b.params, [...order, ...extra], `${path}.params`),
      };
    }),
    wires: d.wires.map((w, i) => ({
      id: w.id,
      from: pick(w.from, ['block', 'port'], `wires[${i}].from`),
      to: pick(w.to, ['block', 'port'], `wires[${i}].to`),
    })),
    cuts: d.cuts.map((c, i) => pick(c, ['id', 'wire', 'label'], `cuts[${i}]`)),
    sweeps: d.sweeps.map((s, i) => pick(s, ['id', 'parameter', 'min', 'max', 'scale', 'label'], `sweeps[${i}]`)),
    // Written whenever present (even empty), so a file loads and saves to the same bytes.
    simulation: d.simulation ? pick(d.simulation, ['end', 'rtol', 'atol', 'probes'], 'simulation') : undefined,
    fits: d.fits ? d.fits.map((f, i) => serializeFit(f, `fits[${i}]`)) : undefined,
    view: (() => {
      const v = pick(d.view, ['zoom', 'offset', 'theme', 'activeCut', 'activeSweep', 'activeProbe'], 'view');
      if (v.offset) v.offset = xy(d.view.offset, 'view.offset');
      return v;
    })(),
  };
  return JSON.stringify(doc, null, 2) + '\n';
}
