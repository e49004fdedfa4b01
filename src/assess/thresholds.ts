/**
 * Thresholds: the shared windows and one schema per question, each field with its default and source in its own
 * file; a site may override any of them in the configuration file (`thresholds`), validated here. The active
 * thresholds are part of the rules version.
 */
import { z } from 'zod';
import { windowsSchema } from './common/windows.js';
import { needThresholdsSchema } from './need/thresholds.js';
import { orderThresholdsSchema } from './order/thresholds.js';
import { responsivenessThresholdsSchema } from './responsiveness/thresholds.js';
import { toleranceThresholdsSchema } from './tolerance/thresholds.js';

export const thresholdsSchema = z
  .object({
    windows: windowsSchema.default(windowsSchema.parse({})),
    need: needThresholdsSchema.default(needThresholdsSchema.parse({})),
    responsiveness: responsivenessThresholdsSchema.default(responsivenessThresholdsSchema.parse({})),
    tolerance: toleranceThresholdsSchema.default(toleranceThresholdsSchema.parse({})),
    order: orderThresholdsSchema.default(orderThresholdsSchema.parse({})),
  })
  .strict();
export type Thresholds = z.infer<typeof thresholdsSchema>;

/** Defaults merged with a site's overrides; throws a ZodError naming the bad key. */
export function resolveThresholds(overrides: unknown = {}): Thresholds {
  return thresholdsSchema.parse(overrides ?? {});
}
