/**
 * Editor in the browser (Debian chromium via the e2e harness; skipped without it):
 *  - first render of the default demo after load (navigation start → every view drawn), ≤ 2 s;
 *  - slider input → all views updated (locus markers, visible view, loops, response drawn), p95 ≤ 50 ms;
 *  - production JavaScript, gzipped (vite build output), ≤ 800 kB.
 * Builds the editor first unless LOOPWRIGHT_E2E_NO_BUILD=1 and a build exists.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { gzipSync } from 'node:zlib';
import type { Page } from 'playwright-core';
import { CHROMIUM, openEditor, setup, teardown } from '../e2e/harness.ts';
import { record, section, slug } from './harness.ts';

const ROOT = resolve(import.meta.dirname, '..', '..');

const q = (xs: number[], f: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(f * s.length))];
};
const line = (name: string, xs: number[], target: number, on: 'median' | 'p95') => {
  const v = on === 'median' ? q(xs, 0.5) : q(xs, 0.95);
  record(`${slug(name)}.median`, q(xs, 0.5), 'ms');
  record(`${slug(name)}.p95`, q(xs, 0.95), 'ms');
  record(`${slug(name)}.runs`, xs.length, 'runs');
  const verdict = v <= target ? 'met' : 'MISSED';
  console.log(
    `  ${name.padEnd(58)} median ${q(xs, 0.5).toFixed(1).padStart(8)} ms  p95 ${q(xs, 0.95).toFixed(1).padStart(8)} ms  n=${xs.length}  (target ${on} ≤ ${target} ms: ${verdict})`,
  );
};

export async function drawnAfterLoad(page: Page): Promise<number> {
  await page.waitForFunction(
    () => {
      // Every view on screen drawn: the Locus with the closed-loop poles, and the open tab.
      const h = (
        window as unknown as {
          __loopwright?: { analysis?: { state(): { complete: boolean; renderedGeneration: number; poles: unknown; locus: unknown } } };
        }
      ).__loopwright?.analysis;
      const s = h?.state();
      return Boolean(s && s.complete && s.renderedGeneration > 0 && s.poles && s.locus);
    },
    undefined,
    { timeout: 30_000, polling: 10 },
  );
  return page.evaluate(() => performance.now());
}

/** Moves the slider by input events (as a drag does) and waits for each generation to be drawn. */
export async function sliderLatencies(page: Page, moves: number): Promise<number[]> {
  return page.evaluate(async (n) => {
    const hook = (
      window as unknown as {
        __loopwright: {
          analysis: { state(): { generation: number; renderedGeneration: number; complete: boolean }; latencies(): number[] };
        };
      }
    ).__loopwright.analysis;
    const slider = document.querySelector<HTMLInputElement>('[data-testid="sweep-slider"]')!;
    const setter = Object.getOwnPropertyDescriptor(HTMLInputElement.prototype, 'value')!.set!;
    const out: number[] = [];
    for (let i = 0; i < n; i++) {
      const before = hook.latencies().length;
      const pos = 300 + ((i * 37) % 400);
      setter.call(slider, String(pos));
      slider.dispatchEvent(new Event('input', { bubbles: true }));
      const t0 = performance.now();
      while (hook.latencies().length === before && performance.now() - t0 < 5000) await new Promise((r) => setTimeout(r, 2));
      const l = hook.latencies();
      if (l.length > before) out.push(l[l.length - 1]);
      await new Promise((r) => setTimeout(r, 30));
    }
    return out;
  }, moves);
}

export async function run(): Promise<void> {
  section('editor in the browser');
  if (!existsSync(CHROMIUM)) {
    console.log(`  skipped: no browser at ${CHROMIUM} (sudo apt-get install -y chromium)`);
    return;
  }
  await setup();
  try {
    // First render after load: a fresh profile each time (no autosave), default demo.
    const firsts: number[] = [];
    for (let i = 0; i < 5; i++) {
      const s = await openEditor({ width: 1440, height: 900 });
      firsts.push(await drawnAfterLoad(s.page));
      if (i < 4) await s.close();
      else {
        const page = s.page;
        for (const tab of ['Response', 'Frequency', 'Loops']) {
          await page.getByRole('tab', { name: tab }).click();
          await drawnAfterLoad(page);
          await sliderLatencies(page, 5); // warm-up
          line(`slider → all views drawn, ${tab} view shown (positioning demo)`, await sliderLatencies(page, 40), 50, 'p95');
          const br = (
            await page.evaluate(() =>
              (window as unknown as { __loopwright: { analysis: { breakdown(): [number, number][] } } }).__loopwright.analysis.breakdown(),
            )
          ).slice(-40);
          const reply = record(
            `slider-${tab.toLowerCase()}.input-to-reply.median`,
            q(
              br.map((b) => b[0]),
              0.5,
            ),
            'ms',
          );
          const drawn = record(
            `slider-${tab.toLowerCase()}.reply-to-drawn.median`,
            q(
              br.map((b) => b[1]),
              0.5,
            ),
            'ms',
          );
          console.log(`    of which: input → last engine reply median ${reply.toFixed(1)} ms, reply → drawn median ${drawn.toFixed(1)} ms`);
        }
        const ms = await page.evaluate(
          () =>
            (
              window as unknown as { __loopwright: { analysis: { state(): { computeMs: Record<string, number> } } } }
            ).__loopwright.analysis.state().computeMs,
        );
        for (const part of ['analysis', 'loops', 'response']) record(`worker-compute.${part}`, ms[part], 'ms');
        console.log(
          `  worker compute per update (last): analysis ${ms.analysis.toFixed(1)} ms, loops ${ms.loops.toFixed(1)} ms, response ${ms.response.toFixed(1)} ms`,
        );
        await s.close();
      }
    }
    line('first render of the demo after load (navigation → all views drawn)', firsts, 2000, 'median');
  } finally {
    await teardown();
  }
  const dir = join(ROOT, 'dist', 'editor', 'assets');
  const js = readdirSync(dir).filter((f) => f.endsWith('.js'));
  // Loaded at start: the entry script(s) named in index.html and the engine worker; the rest
  // are chunks loaded on demand (e.g. the layout engine behind Tidy).
  const html = readFileSync(join(ROOT, 'dist', 'editor', 'index.html'), 'utf8');
  let total = 0;
  let atStart = 0;
  for (const f of js) {
    const gz = gzipSync(readFileSync(join(dir, f))).length;
    total += gz;
    const start = html.includes(f) || f.startsWith('engine.worker');
    if (start) atStart += gz;
    // Chunk names without vite's content hash, so that the figure's name is stable.
    record(`chunk.${f.replace(/-[\w-]{8}\.js$/, '')}.gzip`, gz / 1024, 'kB');
    console.log(`  ${f.padEnd(58)} ${(gz / 1024).toFixed(0).padStart(6)} kB gzipped${start ? '' : ' (loaded on demand)'}`);
  }
  record('javascript-at-start.gzip', atStart / 1024, 'kB');
  record('javascript-all.gzip', total / 1024, 'kB');
  console.log(
    `  production JavaScript loaded at start, gzipped               ${(atStart / 1024).toFixed(0).padStart(6)} kB  (target ≤ 800 kB: ${atStart <= 800 * 1024 ? 'met' : 'MISSED'})`,
  );
  console.log(
    `  production JavaScript, all chunks, gzipped                   ${(total / 1024).toFixed(0).padStart(6)} kB  (target ≤ 800 kB: ${total <= 800 * 1024 ? 'met' : 'MISSED'})`,
  );
}
