#!/usr/bin/env node
// Bundles the command line into one prebuilt ES module, apps/cli/dist/loopwright.mjs, so that
// `npx loopwright` starts without compiling TypeScript or loading libraries it does not use.
// Runs from the root `prepare` step (so `npm ci` / `npm install` leave a working command),
// before `npm pack` in apps/cli (prepack), at the start of `npm test`, and from bin/ whenever
// the sources are newer than the bundle. Also writes, beside the bundle:
//  - build-inputs.json: our source files the bundle was made from (bin/ compares their times);
//  - THIRD-PARTY-LICENSES.txt: the licence of every library compiled into the bundle.
import { existsSync, mkdirSync, readdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const CLI = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const ROOT = resolve(CLI, '..', '..');
const DIST = join(CLI, 'dist');
export const BUNDLE = join(DIST, 'loopwright.mjs');
export const INPUTS = join(DIST, 'build-inputs.json');

/** Writes `text` to `file` through a temporary name, so that a concurrent reader never sees half a file. */
function writeAtomically(file, text) {
  const tmp = `${file}.${process.pid}.tmp`;
  writeFileSync(tmp, text);
  renameSync(tmp, file);
}

/** The package folder (under node_modules) that an input path belongs to, or null for our own files. */
function packageOf(input) {
  const m = /(?:^|\/)node_modules\/((?:@[^/]+\/)?[^/]+)\//.exec(input);
  return m ? m[1] : null;
}

function licences(packages) {
  const parts = ['Libraries compiled into loopwright.mjs, with their licences.', ''];
  for (const name of [...packages].sort()) {
    const dir = join(ROOT, 'node_modules', name);
    const pkg = JSON.parse(readFileSync(join(dir, 'package.json'), 'utf8'));
    const file = readdirSync(dir).find((f) => /^(licen[sc]e|copying)(\.|$)/i.test(f));
    parts.push('='.repeat(78), `${name} ${pkg.version} (${pkg.license ?? 'see below'})`, '='.repeat(78));
    parts.push(file ? readFileSync(join(dir, file), 'utf8').trim() : '(no licence file in the package)', '');
  }
  return parts.join('\n');
}

/** Builds the bundle; returns its size in bytes and the time taken (ms). */
export async function buildCli() {
  const t0 = performance.now();
  const { build } = await import('esbuild');
  const result = await build({
    absWorkingDir: ROOT,
    entryPoints: [join(CLI, 'src', 'process-entry.ts')],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    // Whitespace and syntax only: identifiers keep their names, so internal errors stay readable.
    minifyWhitespace: true,
    minifySyntax: true,
    legalComments: 'none', // the licences go to THIRD-PARTY-LICENSES.txt in full instead
    metafile: true,
    write: false,
    logLevel: 'warning',
  });
  mkdirSync(DIST, { recursive: true });
  const [out] = result.outputFiles;
  const inputs = Object.keys(result.metafile.inputs);
  // Libraries whose code is in the bundle (imported files that tree-shaking emptied do not count).
  const used = Object.entries(Object.values(result.metafile.outputs)[0].inputs)
    .filter(([, v]) => v.bytesInOutput > 0)
    .map(([k]) => packageOf(k));
  const ours = inputs.filter((i) => packageOf(i) === null).map((i) => resolve(ROOT, i));
  // Besides the sources: this script and the lockfile (a library upgrade changes the bundle too).
  ours.push(fileURLToPath(import.meta.url), join(ROOT, 'package-lock.json'));
  const fromDist = (f) => relative(DIST, f).split(sep).join('/');
  writeAtomically(join(DIST, 'THIRD-PARTY-LICENSES.txt'), licences(new Set(used.filter(Boolean))));
  writeAtomically(
    INPUTS,
    JSON.stringify(
      {
        note: 'Written by apps/cli/scripts/build.mjs; paths relative to this folder.',
        files: ours.filter(existsSync).map(fromDist).sort(),
      },
      null,
      1,
    ) + '\n',
  );
  // The bundle last: its time stamp is what bin/ compares the inputs against.
  writeAtomically(BUNDLE, out.text);
  return { bytes: out.contents.length, ms: performance.now() - t0 };
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const { bytes, ms } = await buildCli();
  console.log(`apps/cli/dist/loopwright.mjs: ${(bytes / 1024).toFixed(0)} kB in ${ms.toFixed(0)} ms`);
}
