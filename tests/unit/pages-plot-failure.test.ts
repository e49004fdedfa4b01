// A plot that vega cannot draw leaves the reasoning page, its summary and its table (src/pages/index.ts).
import { describe, expect, it, vi } from 'vitest';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';
import type * as Plots from '../../src/pages/plots.js';

vi.mock('../../src/pages/plots.js', async (orig) => ({
  ...(await orig<typeof Plots>()),
  plotSvg: async () => {
    throw new Error('cannot draw');
  },
}));
const { renderAdvicePage } = await import('../../src/pages/index.js');

describe('renderAdvicePage when a plot fails', () => {
  it('still gives the page, says the plot could not be drawn, and keeps the values table', async () => {
    const snapshot = new SnapshotBuilder({ now: '2026-11-20T14:00:00Z' })
      .measure('meanBp', 61, { ageMin: 10, ref: 'Observation/m1' })
      .build();
    const page = await renderAdvicePage({
      record: {
        id: 'a',
        recordedAt: snapshot.now,
        service: 's',
        hook: 'order-select',
        hookInstance: 'h',
        outcome: 'answered',
        rulesVersion: 'v',
        snapshot,
        advice: { rulesVersion: 'v', now: snapshot.now, findings: [], ruleErrors: [] },
        findings: [],
        cards: [],
        cardKinds: {},
        gathering: [],
        timings: { totalMs: 0, gatherMs: 0, fhirWaitMs: 0, assessMs: 0 },
      },
      words: loadCatalogue().catalogue,
      cautions: ['c'],
      running: { rulesVersion: 'v', thresholds: {} },
      zone: 'UTC',
    });
    expect(page).toContain('This plot could not be drawn');
    expect(page).not.toContain('<svg');
    expect(page).toContain('Observation/m1');
  });
});
