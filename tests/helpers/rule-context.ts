/** The common rule context for tests: a built snapshot, its `now`, thresholds, the default windows and the events. */
import { evidenceEvents } from '../../src/assess/common/events.js';
import type { RuleContext } from '../../src/assess/common/rule.js';
import { DEFAULT_WINDOWS, type Windows } from '../../src/assess/common/windows.js';
import { DEFAULT_NEED_THRESHOLDS, type NeedSettings } from '../../src/assess/need/index.js';
import { DEFAULT_RESPONSIVENESS_THRESHOLDS, type ResponsivenessThresholds } from '../../src/assess/responsiveness/index.js';
import { DEFAULT_TOLERANCE_THRESHOLDS, type ToleranceThresholds } from '../../src/assess/tolerance/index.js';
import type { PatientSnapshot } from '../../src/snapshot/types.js';
import type { SnapshotBuilder } from './snapshot-builder.js';

export function contextOf<T>(s: PatientSnapshot, now: Date, t: T, w: Windows = DEFAULT_WINDOWS): RuleContext<T> {
  return { snapshot: s, now, t, w, events: evidenceEvents(s, now, w.fluidEventMinMl) };
}

export function responsivenessContext(
  b: SnapshotBuilder,
  t: ResponsivenessThresholds = DEFAULT_RESPONSIVENESS_THRESHOLDS,
  w: Windows = DEFAULT_WINDOWS,
): RuleContext<ResponsivenessThresholds> {
  return contextOf(b.build(), b.now, t, w);
}

export function toleranceContext(
  b: SnapshotBuilder,
  t: ToleranceThresholds = DEFAULT_TOLERANCE_THRESHOLDS,
  w: Windows = DEFAULT_WINDOWS,
): RuleContext<ToleranceThresholds> {
  return contextOf(b.build(), b.now, t, w);
}

export function needSettings(t: ToleranceThresholds = DEFAULT_TOLERANCE_THRESHOLDS): NeedSettings {
  return {
    ...DEFAULT_NEED_THRESHOLDS,
    weightMaxAgeHours: t.weightMaxAgeHours,
    admissionWeightWindowHours: t.admissionWeightWindowHours,
    balanceFallbackLookbackHours: t.balanceFallbackLookbackHours,
    urinePointMaxGapMinutes: t.urinePointMaxGapMinutes,
    urineRecencyMinutes: t.urineRecencyMinutes,
    urineCoverageFraction: t.urineCoverageFraction,
  };
}

export function needContext(b: SnapshotBuilder): RuleContext<NeedSettings> {
  return contextOf(b.build(), b.now, needSettings());
}
