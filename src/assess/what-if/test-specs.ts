/**
 * The four tests the advice can offer (NEXT_TESTS), each joined to the dynamic-test kind of the snapshot and to the
 * rule's own spec (read-outs, thresholds, ≥ or >, sources), so that a hypothetical result is judged exactly as a real one.
 */
import type { DynamicTestKind } from '../../fhir/codes.js';
import type { DynamicTestSpec } from '../responsiveness/dynamic-test.js';
import { endExpiratoryOcclusionSpec } from '../responsiveness/end-expiratory-occlusion.js';
import { miniFluidChallengeSpec } from '../responsiveness/mini-fluid-challenge.js';
import { plrSpec } from '../responsiveness/plr.js';
import type { ResponsivenessThresholds } from '../responsiveness/thresholds.js';
import { tidalVolumeChallengeSpec } from '../responsiveness/tidal-volume-challenge.js';
import type { NextTestKind } from '../types.js';

export interface TestSpecEntry {
  kind: DynamicTestKind;
  spec: (t: ResponsivenessThresholds) => DynamicTestSpec;
}

export const TEST_SPECS: Readonly<Record<NextTestKind, TestSpecEntry>> = {
  'passive-leg-raise': { kind: 'plr', spec: plrSpec },
  'mini-fluid-challenge': { kind: 'miniFluidChallenge', spec: miniFluidChallengeSpec },
  'end-expiratory-occlusion': { kind: 'endExpiratoryOcclusion', spec: endExpiratoryOcclusionSpec },
  'tidal-volume-challenge': { kind: 'tidalVolumeChallenge', spec: tidalVolumeChallengeSpec },
};
