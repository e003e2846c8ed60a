/**
 * Browser-test harness: builds the editor once (vite build → dist/editor), serves it on a free
 * 127.0.0.1 port with a tiny static server, and opens it in Debian chromium via playwright-core
 * (never a downloaded browser). `setup`/`teardown` are the vitest global setup; tests call
 * `openEditor()` and `screenshot()`.
 */
import { spawnSync } from 'node:child_process';
import { createServer, type Server } from 'node:http';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { chromium, type Page, type BrowserContext } from 'playwright-core';

const ROOT = resolve(import.meta.dirname, '..', '..');
const DIST = join(ROOT, 'dist', 'editor');
const ARTIFACTS = join(ROOT, 'test-artifacts');
export const CHROMIUM = process.env.LOOPWRIGHT_CHROMIUM ?? '/usr/bin/chromium';

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.wasm': 'application/wasm',
};

let server: Server | undefined;

/** Global setup: build (unless LOOPWRIGHT_E2E_NO_BUILD=1 and a build exists) and serve. */
export async function setup(project?: { provide?: (key: string, value: unknown) => void }): Promise<void> {
  if (!(process.env.LOOPWRIGHT_E2E_NO_BUILD === '1' && existsSync(join(DIST, 'index.html')))) {
    const vite = join(ROOT, 'node_modules', 'vite', 'bin', 'vite.js');
    // NODE_ENV production: under vitest it is 'test', and a build that inherits it bundles React's
    // development runtime (jsxDEV, the DOM checks) — not the editor users run.
    const r = spawnSync(process.execPath, [vite, 'build', '--logLevel', 'warn'], {
      cwd: ROOT,
      stdio: 'inherit',
      env: { ...process.env, NODE_ENV: 'production' },
    });
    if (r.status !== 0) throw new Error('vite build failed');
  }
  server = createServer((req, res) => {
    const path = decodeURIComponent(new URL(req.url ?? '/', 'http://x').pathname);
    let file = normalize(join(DIST, path));
    if (!file.startsWith(DIST + sep)) file = join(DIST, 'index.html');
    if (!existsSync(file) || statSync(file).isDirectory()) file = join(DIST, 'index.html');
    res.writeHead(200, { 'content-type': TYPES[extname(file)] ?? 'application/octet-stream' });
    res.end(readFileSync(file));
  });
  await new Promise<void>((ok) => server!.listen(0, '127.0.0.1', () => ok()));
  const addr = server.address();
  const url = `http://127.0.0.1:${typeof addr === 'object' && addr ? addr.port : 0}/`;
  process.env.LOOPWRIGHT_E2E_URL = url;
  project?.provide?.('editorUrl', url);
}

export async function teardown(): Promise<void> {
  await new Promise<void>((ok) => (server ? server.close(() => ok()) : ok()));
}

async function editorUrl(): Promise<string> {
  try {
    const { inject } = await import('vitest');
    const u = (inject as (k: string) => unknown)('editorUrl');
    if (typeof u === 'string') return u;
  } catch {
    // not inside vitest: fall back to the environment
  }
  const u = process.env.LOOPWRIGHT_E2E_URL;
  if (!u) throw new Error('editor URL unknown: run through tests/e2e/vitest.e2e.config.ts');
  return u;
}

export interface EditorSession {
  page: Page;
  context: BrowserContext;
  url: string;
  /** Close the browser and delete its profile. */
  close(): Promise<void>;
}

export interface OpenOptions {
  width?: number;
  height?: number;
  /** Reuse a profile dir (keeps localStorage between sessions); a fresh one otherwise. */
  profileDir?: string;
  /** Start from this query string, e.g. "?demo=heating-cascade". */
  query?: string;
}

/** Launch chromium on a fresh profile and open the editor; waits for the test hook. */
export async function openEditor(opts: OpenOptions = {}): Promise<EditorSession> {
  const url = await editorUrl();
  const dir = opts.profileDir ?? mkdtempSync(join(tmpdir(), 'loopwright-e2e-'));
  const context = await chromium.launchPersistentContext(dir, {
    executablePath: CHROMIUM,
    headless: true,
    viewport: { width: opts.width ?? 1280, height: opts.height ?? 800 },
    acceptDownloads: true,
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  const page = context.pages()[0] ?? (await context.newPage());
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  await page.goto(url + (opts.query ?? ''));
  await page.waitForFunction(() => Boolean((window as unknown as { __loopwright?: unknown }).__loopwright), undefined, { timeout: 20_000 });
  return {
    page,
    context,
    url,
    async close() {
      await context.close();
      if (!opts.profileDir) rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Save a PNG of the page into test-artifacts/<name>.png and return its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(ARTIFACTS, { recursive: true });
  const path = join(ARTIFACTS, `${name}.png`);
  await page.screenshot({ path });
  return path;
}
