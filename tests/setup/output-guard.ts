/**
 * The output guard (vitest setupFiles, so it runs in every test worker before each test file): nothing may write to
 * stdout or stderr but the pino logger (BRIEF standards; issue 13 item 3). A library that prints client text would let
 * a client forge log lines and put PHI in the service log, and it would do so unseen in production.
 *
 * It wraps every console method and process.stdout.write / process.stderr.write. A console call is always a stray
 * write. A direct write is the logger's only if pino's own code is on the call stack (src/log.ts hands pino a
 * stream, process.stdout by default, so the logger's lines do go through process.stdout.write; the services the
 * tests start log to a sink, so in practice no write is expected at all). A stray write still shows as usual, and
 * it fails the test during which it happened (afterEach) or, when no test was running (module load, beforeAll,
 * afterAll), the file (afterAll).
 *
 * tests/unit/output-guard.test.ts proves that a deliberate write is caught; it takes its own writes back with
 * `takeStrayOutput` so the suite stays green.
 */
import { afterAll, afterEach, beforeEach } from 'vitest';

export interface StrayWrite {
  /** `console.log`, `process.stdout.write`, … */
  via: string;
  /** The start of what was written. */
  text: string;
}

const KEY = Symbol.for('tidemark.output-guard');
const WRAPPED = Symbol.for('tidemark.output-guard.wrapped');
const CONSOLE_METHODS = [
  'log',
  'info',
  'warn',
  'error',
  'debug',
  'trace',
  'dir',
  'dirxml',
  'table',
  'group',
  'groupCollapsed',
  'groupEnd',
  'assert',
  'count',
  'countReset',
  'time',
  'timeEnd',
  'timeLog',
] as const;
/** A direct write whose stack passes through pino (node_modules/pino/lib/…) came from the logger. */
const PINO_FRAME = /[\\/]node_modules[\\/]pino[\\/]/;

interface GuardState {
  pending: StrayWrite[];
  outside: StrayWrite[];
}

const state: GuardState = ((globalThis as Record<symbol, unknown>)[KEY] as GuardState | undefined) ?? { pending: [], outside: [] };
(globalThis as Record<symbol, unknown>)[KEY] = state;

function preview(args: unknown[]): string {
  const text = (a: unknown): string => {
    if (typeof a === 'string') return a;
    return a instanceof Uint8Array ? Buffer.from(a).toString('utf8') : safeString(a);
  };
  const s = args.map(text).join(' ');
  return s.length > 200 ? `${s.slice(0, 200)}…` : s;
}

function safeString(a: unknown): string {
  try {
    return typeof a === 'object' ? (JSON.stringify(a) ?? String(a)) : String(a);
  } catch {
    return String(a);
  }
}

function fromLogger(): boolean {
  const limit = Error.stackTraceLimit;
  Error.stackTraceLimit = 64;
  try {
    return PINO_FRAME.test(new Error('where').stack ?? '');
  } finally {
    Error.stackTraceLimit = limit;
  }
}

function wrapConsole(): void {
  const c = console as unknown as Record<string, ((...a: unknown[]) => unknown) & { [WRAPPED]?: true }>;
  for (const m of CONSOLE_METHODS) {
    const original = c[m];
    if (typeof original !== 'function' || original[WRAPPED]) continue;
    const wrapper = Object.assign(
      function guarded(this: unknown, ...args: unknown[]) {
        state.pending.push({ via: `console.${m}`, text: preview(args) });
        return original.apply(this ?? console, args);
      },
      { [WRAPPED]: true as const },
    );
    c[m] = wrapper;
  }
}

function wrapStream(name: 'stdout' | 'stderr'): void {
  const stream = process[name] as NodeJS.WriteStream & { write: typeof process.stdout.write & { [WRAPPED]?: true } };
  const original = stream.write;
  if (original[WRAPPED]) return;
  const wrapper = Object.assign(
    function guarded(this: unknown, chunk: unknown, ...rest: unknown[]) {
      if (!fromLogger()) state.pending.push({ via: `process.${name}.write`, text: preview([chunk]) });
      return (original as (...a: unknown[]) => boolean).call(this ?? stream, chunk, ...rest);
    },
    { [WRAPPED]: true as const },
  );
  stream.write = wrapper as typeof stream.write;
}

function report(writes: StrayWrite[], where: string): Error {
  const lines = writes.slice(0, 10).map((w) => `  ${w.via}: ${JSON.stringify(w.text)}`);
  return new Error(
    `output guard: ${writes.length} write(s) to stdout/stderr ${where} not through the pino logger ` +
      `(nothing but the logger may write there; give a test's logger a sink, see tests/helpers/server.ts):\n${lines.join('\n')}`,
  );
}

/** The stray writes recorded since the current test began, taken out of the guard (for the guard's own test only). */
export function takeStrayOutput(): StrayWrite[] {
  return state.pending.splice(0);
}

wrapConsole();
wrapStream('stdout');
wrapStream('stderr');

beforeEach(() => {
  // Whatever came before this test (module load, beforeAll) belongs to no test: the file answers for it.
  state.outside.push(...state.pending.splice(0));
});

afterEach(() => {
  const writes = state.pending.splice(0);
  if (writes.length) throw report(writes, 'during this test');
});

afterAll(() => {
  const writes = [...state.outside.splice(0), ...state.pending.splice(0)];
  if (writes.length) throw report(writes, 'outside any test of this file (module load, beforeAll or afterAll)');
});
