/**
 * A CliIo for tests that run commands in-process through main(): files from a record, what the
 * command prints collected, what it writes kept; a write can be made to fail (a path that
 * cannot be written) and standard input given.
 */
import type { CliIo } from './io.ts';

export function fakeIo(files: Record<string, string> = {}, opts: { stdin?: string; failWrites?: boolean | readonly string[] } = {}) {
  let out = '';
  let err = '';
  const written: Record<string, string> = {};
  const fails = (p: string) => (Array.isArray(opts.failWrites) ? opts.failWrites.includes(p) : opts.failWrites === true);
  const io: CliIo = {
    stdout: (s) => void (out += s),
    stderr: (s) => void (err += s),
    readFile: async (p) => {
      if (p in written) return written[p]; // what a command wrote reads back
      if (!(p in files)) throw Object.assign(new Error(`ENOENT: ${p}`), { code: 'ENOENT' });
      return files[p];
    },
    writeFile: async (p, text) => {
      if (fails(p)) throw Object.assign(new Error(`EACCES: permission denied, open '${p}'`), { code: 'EACCES' });
      written[p] = text;
    },
    ...(opts.stdin !== undefined ? { readStdin: async () => opts.stdin! } : {}),
  };
  return { io, out: () => out, err: () => err, written };
}
