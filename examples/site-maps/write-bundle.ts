/**
 * Writes the invented hospital-coded chart (hospital-chart.ts) as a FHIR collection Bundle, times relative to now:
 *   npx tsx examples/site-maps/write-bundle.ts /tmp/hospital-coded.json
 *   npm run -s readiness -- --bundle /tmp/hospital-coded.json --config examples/site-maps/tidemark-config.json
 */
import { writeFileSync } from 'node:fs';
import { siteChart } from './hospital-chart.js';

const out = process.argv[2] ?? 'hospital-coded.bundle.json';
writeFileSync(
  out,
  `${JSON.stringify({ resourceType: 'Bundle', type: 'collection', entry: siteChart(new Date()).map((resource) => ({ resource })) }, null, 2)}\n`,
);
