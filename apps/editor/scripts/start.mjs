#!/usr/bin/env node
// `npm start`: build the editor with vite into dist/editor, then serve it on 127.0.0.1 and
// print the URL. PORT picks the port (default 5173; the next free one is used if taken).
import { spawnSync } from 'node:child_process';
import { createServer } from 'node:http';
import { existsSync, readFileSync, statSync } from 'node:fs';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createRequire } from 'node:module';

const root = resolve(fileURLToPath(new URL('../../..', import.meta.url)));
const dist = join(root, 'dist', 'editor');
const require = createRequire(import.meta.url);

if (!process.argv.includes('--no-build')) {
  const viteBin = join(require.resolve('vite/package.json', { paths: [root] }), '..', 'bin', 'vite.js');
  console.log('Building the editor (vite build)…');
  // Always the production build: a NODE_ENV left at 'development' or 'test' in the shell would
  // bundle React's development runtime.
  const r = spawnSync(process.execPath, [viteBin, 'build', '--logLevel', 'warn'], {
    cwd: root,
    stdio: 'inherit',
    env: { ...process.env, NODE_ENV: 'production' },
  });
  if (r.status !== 0) {
    console.error('vite build failed');
    process.exit(r.status ?? 1);
  }
}
if (!existsSync(join(dist, 'index.html'))) {
  console.error(`no build found at ${dist}`);
  process.exit(1);
}

const TYPES = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.woff2': 'font/woff2',
  '.wasm': 'application/wasm',
};

const server = createServer((req, res) => {
  const path = decodeURIComponent(new URL(req.url ?? '/', 'http://x').pathname);
  let file = normalize(join(dist, path));
  if (!file.startsWith(dist + sep) && file !== dist) {
    res.writeHead(403).end();
    return;
  }
  if (!existsSync(file) || statSync(file).isDirectory()) file = join(dist, 'index.html');
  res.writeHead(200, { 'content-type': TYPES[extname(file)] ?? 'application/octet-stream', 'cache-control': 'no-cache' });
  res.end(readFileSync(file));
});

let port = Number(process.env.PORT ?? 5173);
server.on('error', (e) => {
  if (e.code === 'EADDRINUSE' && port < 65535) {
    port += 1;
    server.listen(port, '127.0.0.1');
  } else {
    console.error(e.message);
    process.exit(1);
  }
});
server.on('listening', () => {
  console.log(`\nLoopwright editor: http://127.0.0.1:${port}/\n(Ctrl+C to stop)`);
});
server.listen(port, '127.0.0.1');
