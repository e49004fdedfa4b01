/**
 * The test that would settle an indeterminate verdict, chosen from the patient's state:
 * - controlled ventilation without effort, sinus rhythm, tidal volume below 8 mL/kg PBW → tidal volume challenge
 *   (Myatra 2017: made for low tidal volume);
 * - intra-abdominal hypertension → mini fluid challenge with VTI (PLR is less reliable with raised abdominal
 *   pressure: Mahjoub Y et al., Crit Care Med 2010, from memory);
 * - controlled ventilation → PLR with real-time cardiac output, or end-expiratory occlusion;
 * - otherwise → PLR with real-time cardiac output; else a mini fluid challenge with VTI.
 */
import type { RuleContext } from './context.js';
import { fmt } from './finding.js';
import { checkIntraAbdominalPressure, checkRhythm, checkTidalVolume, checkVentilation } from './heart-lung-validity.js';
import { latestCoded } from './select.js';

export function chooseNextTest(ctx: RuleContext): string {
  const { t } = ctx;
  const plr = `passive leg raising with real-time cardiac output or stroke volume monitoring (rise ≥ ${fmt(t.plrFlowRisePercent)} %, Monnet 2016)`;
  const mfc = `a mini fluid challenge (100 mL over 1 min) with subaortic VTI (rise ≥ ${fmt(t.miniFluidChallengeRisePercent)} %, Muller 2011)`;
  const vent = checkVentilation(ctx);
  if (vent.state === 'met' && checkRhythm(ctx).state === 'met' && checkTidalVolume(ctx).state === 'failed') {
    return `Tidal volume challenge: raise Vt from 6 to 8 mL/kg PBW for 1 min; an absolute PPV rise ≥ ${fmt(t.tidalVolumeChallengePpvRisePoints)} points predicts response (Myatra 2017)`;
  }
  if (checkIntraAbdominalPressure(ctx).state === 'failed') {
    return `Mini fluid challenge (100 mL over 1 min) with subaortic VTI (rise ≥ ${fmt(t.miniFluidChallengeRisePercent)} %, Muller 2011); passive leg raising is less reliable with intra-abdominal hypertension`;
  }
  const mode = latestCoded(ctx.snapshot, 'ventilationMode', ctx.now, t.ventilationStateMaxAgeMin);
  if (mode.state === 'fresh' && mode.item.answer.startsWith('controlled')) {
    return `Passive leg raising with real-time cardiac output or stroke volume monitoring (rise ≥ ${fmt(t.plrFlowRisePercent)} %, Monnet 2016), `
      + `or an end-expiratory occlusion test (cardiac index rise > ${fmt(t.eeoFlowRisePercent)} %, Monnet 2009)`;
  }
  return `${plr[0]?.toUpperCase()}${plr.slice(1)}; if that is not possible, ${mfc}`;
}
