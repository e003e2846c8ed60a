/**
 * Sampled-data studies: a loop expression closed through a sampler and zero-order hold
 * (`loopwright margins|locus --loop … --sample-time T`), and the code export of a sampled
 * controller block (`loopwright export`, the editor's export action).
 */
import { InputError } from '@loopwright/lti';
import type { Diagram } from '@loopwright/graph';
import {
  EXPORT_LANGUAGES,
  type ExportLanguage,
  type ExportedFile,
  type SampledMargins,
  type TestVector,
  type ZPlaneLocus,
  coefficientsText,
  exportController,
  sampledLocus,
  sampledMargins,
  checkCodeName,
  cTestProgram,
} from '@loopwright/sampled';
import { type ExpressionLoop, loopOfExpression } from './loop-expression.ts';
import { requireSampledBlock } from './sampled-block.ts';
import { simulatedTestVector } from './block-test-vector.ts';

/** How the loop expression is sampled: L(s) behind a sampler, a hold and D samples of computation delay. */
export interface ExpressionSampling {
  sampleTime: number;
  computeDelay?: number;
  /** The hold between the sampled error and L(s): only the zero-order hold today. */
  hold?: string;
}

function checkSampling(s: ExpressionSampling): void {
  if (!(s.sampleTime > 0) || !Number.isFinite(s.sampleTime))
    throw new InputError(`sample time: ${s.sampleTime} must be a positive number of seconds`, { field: 'sampleTime' });
  if (s.computeDelay !== undefined && !(s.computeDelay >= 0 && Number.isFinite(s.computeDelay))) {
    throw new InputError(`compute delay: ${s.computeDelay} must be 0 or more samples`, { field: 'computeDelay' });
  }
  if (s.hold !== undefined && s.hold !== 'zoh')
    throw new InputError(`hold: "${s.hold}" is not supported; the only hold is zoh (zero-order hold)`, { field: 'hold' });
}

/** Margins of 1 + G(z) = 0, G the zero-order-hold equivalent of L(s) with the computation delay. */
export function expressionSampledMargins(
  e: ExpressionLoop,
  s: ExpressionSampling,
): { loop: ReturnType<typeof loopOfExpression>; margins: SampledMargins } {
  checkSampling(s);
  const loop = loopOfExpression(e);
  return { loop, margins: sampledMargins({ plant: loop, sampleTime: s.sampleTime, computeDelay: s.computeDelay ?? 0 }) };
}

/** The z-plane root locus of 1 + k·G(z) = 0 with its unit-circle crossings. */
export function expressionSampledLocus(
  e: ExpressionLoop,
  s: ExpressionSampling,
  opts: { negative?: boolean; kMax?: number; samples?: number } = {},
): { loop: ReturnType<typeof loopOfExpression>; locus: ZPlaneLocus } {
  checkSampling(s);
  const loop = loopOfExpression(e);
  const locus = sampledLocus(
    { plant: loop, sampleTime: s.sampleTime, computeDelay: s.computeDelay ?? 0 },
    {
      negative: opts.negative === true,
      ...(opts.kMax !== undefined ? { kMax: opts.kMax } : {}),
      ...(opts.samples !== undefined ? { samples: opts.samples } : {}),
    },
  );
  return { loop, locus };
}

// ------------------------------------------------------------------------------ export

export interface ExportRequest {
  /** The sampled controller block. */
  block: string;
  lang: ExportLanguage;
  /** Identifier stem of the generated code (default: from the block id). */
  name?: string;
  /** Samples in the test vector (default 400). */
  samples?: number;
  overrides?: Record<string, number>;
}

export interface ExportData {
  block: string;
  name: string;
  lang: ExportLanguage;
  /** The generated files (a C export also carries `<name>_check.c`, which replays the test vector). */
  files: ExportedFile[];
  /** The block alone in the simulator on a fixed input: its outputs per sample, for whoever ports the code. */
  testVector: TestVector;
  /** The difference equation and coefficients in words. */
  summary: string;
}

/** A C identifier stem from a block id ("pid-1" → "pid_1"; a leading digit gets a prefix). */
export function codeNameOf(blockId: string): string {
  const s = blockId.replace(/[^A-Za-z0-9_]/g, '_').replace(/^_+/, '');
  return /^[A-Za-z]/.test(s) ? s : `ctrl_${s}`;
}

export function exportStudy(d: Diagram, r: ExportRequest): ExportData {
  if (!(EXPORT_LANGUAGES as readonly string[]).includes(r.lang))
    throw new InputError(`lang: "${r.lang}" is not one of ${EXPORT_LANGUAGES.join(', ')}`, { field: 'lang' });
  const sb = requireSampledBlock(d, r.block, r.overrides);
  const name = checkCodeName(r.name ?? codeNameOf(r.block));
  const testVector = simulatedTestVector(d, sb.block, sb.controller, name, r.overrides ?? {}, r.samples ?? 400);
  const files = exportController(sb.controller, r.lang, name);
  if (r.lang === 'c') files.push(cTestProgram(sb.controller, testVector, name));
  return { block: r.block, name, lang: r.lang, files, testVector, summary: coefficientsText(sb.controller, name) };
}
