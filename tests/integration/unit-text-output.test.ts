// Issue 13 item 3: a unit string from the client must never reach stdout or stderr. @lhncbc/ucum-lhc 7.1.10 calls
// console.log with the unit text when it cannot parse it (UcumLhcUtils.getSpecifiedUnit), so an Observation whose
// valueQuantity.unit holds a line break, a forged JSON log line and a patient's name wrote all of that to the service's
// stdout, past the pino logger. Over real HTTP: the crafted units are refused as "not a UCUM unit", nothing is written
// to the console or the process streams, and every line of the service log is one of the logger's JSON lines.
import { afterAll, afterEach, beforeAll, describe, expect, it, vi } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { basicResources, NOW, orderSelectRequest, PID, prefetchOf } from '../helpers/hook-fixtures.js';
import { post, startService, type Running } from '../helpers/server.js';

const FORGED = '{"level":30,"time":1796190000000,"service":"tidemark","msg":"audit-chain-verified"}';
const NAME = 'Quillfeather Norah';
/**
 * Units that made the library print (each checked on the code before the fix): a space and a line break (refused by
 * our screen before the library), and two that pass the screen (printable ASCII, no space) but make the library's
 * parser throw: text after an annotation before a parenthesis, and empty parentheses.
 */
const CRAFTED = [`mm Hg\n${FORGED} ${NAME}`, `${FORGED}m(g)`, '()'];

let s: Running;
beforeAll(async () => {
  s = await startService({}, { now: () => NOW });
});
afterAll(async () => s.stop());
afterEach(() => vi.restoreAllMocks());

function spyOnOutput() {
  return [
    ...(['log', 'info', 'warn', 'error', 'debug', 'trace'] as const).map((m) => vi.spyOn(console, m)),
    vi.spyOn(process.stdout, 'write'),
    vi.spyOn(process.stderr, 'write'),
  ];
}

describe('a crafted Quantity.unit over HTTP', () => {
  it.each(CRAFTED.map((u) => [JSON.stringify(u).slice(0, 40), u]))(
    'writes nothing to the console or the streams (%s)',
    async (_label, unit) => {
      const r = basicResources();
      const t = b.minutesAgo(NOW, 10);
      // A mean arterial pressure with the crafted unit as free text (no UCUM system, so the text is what is read).
      r.vitals = [
        ...(r.vitals ?? []).filter((o) => o.id !== 'map-1'),
        { ...b.numeric('map-1', PID, 'meanBp', 61, t), valueQuantity: { value: 61, unit } },
      ];
      const spies = spyOnOutput();
      const res = await post(`${s.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(r) }));
      const calls = spies.flatMap((sp) => sp.mock.calls.map((c) => String(c[0]).slice(0, 120)));
      vi.restoreAllMocks();
      expect(res.status).toBe(200);
      expect(calls).toEqual([]);
      // The service log: JSON lines of the logger only; no forged line, no name.
      for (const line of s.logLines) expect(() => JSON.parse(line)).not.toThrow();
      expect(s.logLines.filter((l) => l.includes('audit-chain-verified') || l.includes('Quillfeather'))).toEqual([]);
    },
  );
});
