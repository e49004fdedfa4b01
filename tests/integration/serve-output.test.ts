// `npm start` (src/cli/serve.ts) writes nothing but the logger's JSON lines, also when it cannot start: a refused
// configuration is one fatal pino line on stdout and exit code 2, nothing on stderr (issue 13 item 3).
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';

describe('serve, refused configuration', () => {
  it('logs one fatal JSON line naming the variable and exits 2', () => {
    const run = spawnSync(process.execPath, ['--import', 'tsx', 'src/cli/serve.ts'], {
      env: { ...process.env, PORT: 'not-a-port', TIDEMARK_TRIAL_MODE: 'true', TIDEMARK_AUDIT_TOKEN: 'serve-output-token-0123' },
      encoding: 'utf8',
      timeout: 30_000,
    });
    expect(run.status).toBe(2);
    expect(run.stderr).toBe('');
    const lines = run.stdout.split('\n').filter(Boolean);
    expect(lines).toHaveLength(1);
    const line = JSON.parse(lines[0] as string) as Record<string, unknown>;
    expect(line).toMatchObject({ level: 60, service: 'tidemark', msg: 'configuration refused' });
    expect(String(line['err'])).toContain('PORT');
  });
});
