/** The logger: JSON lines (pino). Secrets are redacted; PHI is kept to ids by what callers pass. */
import { pino, type Logger } from 'pino';

export type Log = Pick<Logger, 'info' | 'warn' | 'error' | 'debug'>;

export function createLogger(level: string, destination?: NodeJS.WritableStream): Logger {
  return pino(
    {
      level,
      base: { service: 'tidemark' },
      redact: {
        paths: [
          'authorization',
          'req.headers.authorization',
          'headers.authorization',
          'access_token',
          '*.access_token',
          'fhirAuthorization',
          '*.fhirAuthorization',
          'token',
        ],
        censor: '[redacted]',
      },
    },
    destination ?? process.stdout,
  );
}
