/**
 * `npm run -s readiness -- --fhir-server URL [--token T] --patient ID [--patient ID…] [--config file] [--format json]`
 * `npm run -s readiness -- --bundle file.json [--bundle file.json…] [--patient ID…] [--config file] [--format json]`
 * The data-readiness report (docs/integration.md): what the services would gather for these patients, how it is
 * read (through the site's maps in the configuration file), the codes no map covers, and which verdicts could be
 * reached. `--bundle` loads FHIR Bundles (each patient in them, unless --patient says which) into the embedded FHIR server
 * (src/devserver/embedded-fhir.ts) and runs
 * the same searches against it. The token may come from TIDEMARK_FHIR_TOKEN instead of the command line (which
 * other users of the machine can see). The report goes to stdout; problems are a pino line on stderr.
 */
import { readFileSync } from 'node:fs';
import type { Bundle } from 'fhir/r4.js';
import { loadConfig } from '../config/config.js';
import { startEmbeddedFhir, type EmbeddedFhir } from '../devserver/embedded-fhir.js';
import { createLogger } from '../log.js';
import { writeReport } from '../readiness/report.js';
import { runReadiness } from '../readiness/run.js';

class UsageError extends Error {}

interface Args {
  fhirServer?: string;
  token?: string;
  patients: string[];
  bundles: string[];
  config?: string;
  format: 'text' | 'json';
}

const USAGE = 'usage: readiness (--fhir-server URL [--token T] | --bundle FILE) [--patient ID …] [--config FILE] [--format text|json]';

function parseArgs(argv: readonly string[]): Args {
  const out: Args = { patients: [], bundles: [], format: 'text' };
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    const value = argv[i + 1];
    if (value === undefined || value.startsWith('--')) throw new UsageError(`${flag} needs a value; ${USAGE}`);
    i += 1;
    if (flag === '--fhir-server') out.fhirServer = value;
    else if (flag === '--token') out.token = value;
    else if (flag === '--patient') out.patients.push(value);
    else if (flag === '--bundle') out.bundles.push(value);
    else if (flag === '--config') out.config = value;
    else if (flag === '--format' && (value === 'json' || value === 'text')) out.format = value;
    else throw new UsageError(`unknown option ${String(flag).slice(0, 40)} ${value.slice(0, 40)}; ${USAGE}`);
  }
  if (!out.fhirServer === !out.bundles.length) throw new UsageError(`give either --fhir-server or --bundle; ${USAGE}`);
  if (out.fhirServer && !out.patients.length) throw new UsageError(`--fhir-server needs at least one --patient; ${USAGE}`);
  if (out.patients.some((p) => !/^[A-Za-z0-9\-.]{1,64}$/.test(p)))
    throw new UsageError('--patient takes a FHIR id (1-64 of A-Z a-z 0-9 - .)');
  return out;
}

async function main(): Promise<number> {
  const log = createLogger('info', process.stderr);
  let fhir: EmbeddedFhir | undefined;
  try {
    const args = parseArgs(process.argv.slice(2));
    const env = { ...process.env, ...(args.config ? { TIDEMARK_CONFIG_FILE: args.config } : {}) };
    const cfg = loadConfig(env);
    let base = args.fhirServer as string;
    let patients = args.patients;
    const token = args.token ?? process.env['TIDEMARK_FHIR_TOKEN'];
    if (args.bundles.length) {
      fhir = await startEmbeddedFhir();
      const found: string[] = [];
      for (const file of args.bundles) {
        const bundle = JSON.parse(readFileSync(file, 'utf8')) as Bundle;
        await fhir.load(bundle);
        found.push(
          ...(bundle.entry ?? [])
            .map((e) => e.resource)
            .filter((r) => r?.resourceType === 'Patient' && r.id)
            .map((r) => r?.id as string),
        );
      }
      base = fhir.baseUrl;
      if (!patients.length) patients = found;
    }
    const report = await runReadiness({ fhirServer: base, ...(token && !fhir ? { token } : {}), patients, cfg });
    writeReport(report, args.format, (text) => process.stdout.write(text));
    return 0;
  } catch (e) {
    log.fatal(
      { err: String((e as Error)?.message ?? e).slice(0, 2000) },
      e instanceof UsageError ? 'readiness: bad arguments' : 'readiness report failed',
    );
    return e instanceof UsageError ? 2 : 1;
  } finally {
    await fhir?.close();
  }
}

void main().then((code) => {
  process.exitCode = code;
});
