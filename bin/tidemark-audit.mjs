#!/usr/bin/env node
// The audit command line as its own program (package.json "bin"): no npm banner in front of an export.
// Same commands as `npm run -s audit -- …` (src/cli/audit.ts); TypeScript is loaded through tsx.
import { register } from 'tsx/esm/api';

register();
const { run } = await import('../src/cli/audit.ts');
run(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (e) => {
    process.stderr.write(`${e?.message ?? e}\n`);
    process.exit(1);
  },
);
