// The few globals that every runtime Loopwright's pure packages run in provides (browsers,
// Web Workers, Node ≥ 20), declared without pulling in the DOM or Node type libraries, so that
// `document`, `window` or `process` in packages/* stay type errors.

interface PortablePerformance {
  /** Milliseconds since the time origin, monotonic: budgets and deadlines use it. */
  now(): number;
}
declare const performance: PortablePerformance;

interface PortableConsole {
  log(...data: unknown[]): void;
  info(...data: unknown[]): void;
  warn(...data: unknown[]): void;
  error(...data: unknown[]): void;
  debug(...data: unknown[]): void;
}
declare const console: PortableConsole;

declare function structuredClone<T>(value: T): T;
