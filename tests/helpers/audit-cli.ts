/** The audit command line (src/cli/audit.ts) as a child process. */
import { spawn } from 'node:child_process';

export interface CliResult {
  status: number | null;
  stdout: string;
  stderr: string;
}

/**
 * Awaited without blocking this process: a service under test running here keeps answering, and its idle
 * keep-alive sockets are not left half-closed for the next fetch (as a blocked event loop would leave them).
 */
export function auditCli(env: Record<string, string>, ...args: string[]): Promise<CliResult> {
  return node(['--import', 'tsx', 'src/cli/audit.ts', ...args], env);
}

/** The package's own program (package.json "bin": bin/tidemark-audit.mjs), run as an installed bin would be. */
export function auditBin(env: Record<string, string>, ...args: string[]): Promise<CliResult> {
  return node(['bin/tidemark-audit.mjs', ...args], env);
}

function node(argv: string[], env: Record<string, string>): Promise<CliResult> {
  return new Promise((resolve, reject) => {
    const c = spawn(process.execPath, argv, { env: { ...process.env, ...env } });
    let stdout = '';
    let stderr = '';
    c.stdout.setEncoding('utf8').on('data', (d: string) => (stdout += d));
    c.stderr.setEncoding('utf8').on('data', (d: string) => (stderr += d));
    c.on('error', reject);
    c.on('close', (status) => resolve({ status, stdout, stderr }));
  });
}
