import type { CliIo } from './io.ts';

/**
 * An in-memory io for running commands through main() in tests: files by path, optional standard
 * input, writes that fail (EACCES) when asked; out() and err() give what was printed.
 */
export function fakeIo(files: Record<string, string> = {}, stdin?: string, failWrites = false) {
  let out = '';
  let err = '';
  const io: CliIo = {
    stdout: (s) => void (out += s),
    stderr: (s) => void (err += s),
    readFile: async (p) => {
      if (!(p in files)) throw Object.assign(new Error(`ENOENT: ${p}`), { code: 'ENOENT' });
      return files[p];
    },
    writeFile: async (p) => {
      if (failWrites) throw Object.assign(new Error(`EACCES: permission denied, open '${p}'`), { code: 'EACCES' });
    },
    ...(stdin !== undefined ? { readStdin: async () => stdin } : {}),
  };
  return { io, out: () => out, err: () => err };
}
