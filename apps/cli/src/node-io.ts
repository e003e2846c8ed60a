/**
 * The command line's tie to a real process: files, standard streams and the exit code. A
 * closed reader (`loopwright ... --json | head -1`) ends the run quietly instead of with an
 * EPIPE stack trace.
 */
import { readFile, writeFile } from 'node:fs/promises';
import { main } from './main.ts';
import type { CliIo } from './io.ts';

function readAll(stream: NodeJS.ReadableStream): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    stream.on('data', (c: Buffer | string) => chunks.push(typeof c === 'string' ? Buffer.from(c) : c));
    stream.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')));
    stream.on('error', reject);
  });
}

export async function runFromProcess(argv: string[] = process.argv.slice(2)): Promise<void> {
  let closed = false;
  const quietOnEpipe = (err: NodeJS.ErrnoException) => {
    if (err.code !== 'EPIPE') throw err;
    // The reader has what it wanted: stop writing and leave with the code so far.
    closed = true;
    process.exit(process.exitCode ?? 0);
  };
  process.stdout.on('error', quietOnEpipe);
  process.stderr.on('error', quietOnEpipe);
  const io: CliIo = {
    stdout: (s) => void (closed || process.stdout.write(s)),
    stderr: (s) => void (closed || process.stderr.write(s)),
    readFile: (p) => readFile(p, 'utf8'),
    writeFile: (p, text) => writeFile(p, text),
    readStdin: () => readAll(process.stdin),
  };
  process.exitCode = await main(argv, io);
}
