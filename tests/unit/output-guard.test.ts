// The output guard (tests/setup/output-guard.ts, a vitest setupFiles entry) catches every write to stdout or stderr
// that does not come from the pino logger. Each check writes on purpose, then takes its writes back from the guard
// with takeStrayOutput, so that this file stays green; without the take, the guard's afterEach would fail the test.
import { spawnSync } from 'node:child_process';
import { PassThrough } from 'node:stream';
import { describe, expect, it } from 'vitest';
import { createLogger } from '../../src/log.js';
import { takeStrayOutput } from '../setup/output-guard.js';

describe('output guard', () => {
  it('is installed in this worker: a deliberate console.log is recorded', () => {
    console.log('deliberate stray line from the guard test');
    expect(takeStrayOutput()).toEqual([{ via: 'console.log', text: 'deliberate stray line from the guard test' }]);
  });

  it('records console.error, console.warn, console.info and console.debug alike', () => {
    console.error('e');
    console.warn('w');
    console.info('i');
    console.debug('d');
    expect(takeStrayOutput().map((w) => w.via)).toEqual(['console.error', 'console.warn', 'console.info', 'console.debug']);
  });

  it('records direct writes to process.stdout and process.stderr', () => {
    process.stdout.write('direct stdout line\n');
    process.stderr.write(Buffer.from('direct stderr line\n'));
    expect(takeStrayOutput()).toEqual([
      { via: 'process.stdout.write', text: 'direct stdout line\n' },
      { via: 'process.stderr.write', text: 'direct stderr line\n' },
    ]);
  });

  it('lets the pino logger write to process.stdout (its default destination), and nothing else', () => {
    const log = createLogger('info');
    log.info({ check: 'output-guard' }, 'a logger line on stdout is allowed');
    expect(takeStrayOutput()).toEqual([]);
  });

  it('records a write that only passes a line through a stream of our own to stdout', () => {
    const relay = new PassThrough();
    relay.on('data', (d: Buffer) => process.stdout.write(d));
    relay.write('relayed\n');
    expect(takeStrayOutput()).toEqual([{ via: 'process.stdout.write', text: 'relayed\n' }]);
  });

  it('fails the test that wrote and the file for a write outside a test, in a vitest of its own (tests/setup/fixtures)', () => {
    const run = spawnSync(
      process.execPath,
      ['node_modules/vitest/vitest.mjs', 'run', '--config', 'tests/setup/fixtures/vitest.fixture.config.ts', '--reporter=json'],
      {
        encoding: 'utf8',
        env: { ...process.env, NO_COLOR: '1' },
        timeout: 60_000,
      },
    );
    expect(run.status).toBe(1);
    const report = JSON.parse(run.stdout) as {
      testResults: Array<{
        status: string;
        message: string;
        assertionResults: Array<{ title: string; status: string; failureMessages: string[] }>;
      }>;
    };
    const file = report.testResults[0];
    expect(file?.status).toBe('failed');
    expect(file?.message).toContain('console.warn: "stray line after the tests"');
    const byTitle = Object.fromEntries((file?.assertionResults ?? []).map((a) => [a.title, a]));
    expect(byTitle['writes with console.log']?.status).toBe('failed');
    expect(byTitle['writes with console.log']?.failureMessages.join('')).toMatch(/console\.log: .*stray line from a test/);
    expect(byTitle['writes with process.stderr.write']?.status).toBe('failed');
    expect(byTitle['writes nothing']?.status).toBe('passed');
  });
});
