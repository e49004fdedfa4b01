/**
 * `npx tsx bench/what-if-cost.ts [calls]`: what the what-if (Advice.whatIf, src/assess/what-if/) costs per assess()
 * call, over the snapshots of the demo scenarios (invented patients) read as the service reads them: `calls`
 * assess() calls with the what-if and as many without, after a warm-up, three rounds each. Prints milliseconds per
 * call and the number of feasible tests per scenario (each feasible test is two re-runs of the engine). A
 * development aid; it asserts nothing.
 */
import { SCENARIOS } from '../examples/scenarios/index.js';
import { assess } from '../src/assess/assess.js';
import { resolveThresholds } from '../src/assess/thresholds.js';
import { buildSnapshot } from '../src/snapshot/normalize.js';

const calls = Number(process.argv[2] ?? 1000);
if (!Number.isInteger(calls) || calls < 10 || calls > 100_000) throw new Error('calls: a whole number from 10 to 100000');

const now = new Date('2026-11-20T14:00:00Z');
const t = resolveThresholds({});
const snapshots = SCENARIOS.map((s) => {
  const built = s.build(now);
  return buildSnapshot(
    built.resources,
    {
      patientId: s.patientId,
      encounterId: s.encounterId,
      ...(built.hook === 'order-select' ? { selections: built.selections } : {}),
      draftOrders: { entry: built.draftOrders.map((resource) => ({ resource })) },
    },
    now,
  );
});

function msPerCall(whatIf: boolean): number {
  const t0 = process.hrtime.bigint();
  for (let i = 0; i < calls; i += 1) assess(snapshots[i % snapshots.length]!, now, t, 'bench', { whatIf });
  return Number(process.hrtime.bigint() - t0) / 1e6 / calls;
}

for (let i = 0; i < 200; i += 1) assess(snapshots[i % snapshots.length]!, now, t, 'bench');
console.log(`assess() over ${snapshots.length} demo scenarios, ${calls} calls per round, node ${process.version}`);
for (let round = 1; round <= 3; round += 1) {
  const without = msPerCall(false);
  const withIt = msPerCall(true);
  console.log(
    `round ${round}: without what-if ${without.toFixed(3)} ms/call, with ${withIt.toFixed(3)} ms/call (+${(withIt - without).toFixed(3)})`,
  );
}
const feasible = snapshots.map((s) => assess(s, now, t, 'bench').whatIf?.rows.filter((r) => r.feasible).length ?? 0);
console.log(
  `feasible tests per scenario: ${feasible.join(' ')} (mean ${(feasible.reduce((a, b) => a + b, 0) / feasible.length).toFixed(2)}; re-runs = 2 × that)`,
);
