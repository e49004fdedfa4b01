/**
 * Rules version = package version + digest of the card catalogue, the active thresholds and the value sets
 * (design: replay). The value sets (src/fhir/value-sets/*.json) decide which conditions, rhythms and fluids are
 * recognised, so a changed code changes the output and must change the version. The site's maps too, when any.
 */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { SiteMap } from '../fhir/site-map.js';
import { VALUE_SETS } from '../fhir/value-sets.js';
import { canonicalJson } from '../util/canonical-json.js';

const pkg = JSON.parse(readFileSync(fileURLToPath(new URL('../../package.json', import.meta.url)), 'utf8')) as { version: string };
export const PACKAGE_VERSION = pkg.version;

const digest8 = (v: unknown): string => createHash('sha256').update(canonicalJson(v)).digest('hex').slice(0, 8);

/** Digest of the value sets (first 8 hex characters of SHA-256 over their canonical JSON). */
export function valueSetsDigest(valueSets: unknown = VALUE_SETS): string {
  return digest8(valueSets);
}

/**
 * `siteMap`: the site's ConceptMaps and unit hints (src/fhir/site-map.ts) decide which site codes and unit texts are
 * read, so when any is configured their digest is added (`.m…`): replay then knows which mapping was in force.
 */
export function rulesVersion(catalogueDigest: string, thresholds: unknown, valueSets: unknown = VALUE_SETS, siteMap?: SiteMap): string {
  const site =
    siteMap && (siteMap.configured.conceptMaps.length || Object.keys(siteMap.configured.unitHints).length)
      ? `.m${digest8(siteMap.configured)}`
      : '';
  return `${PACKAGE_VERSION}+c${catalogueDigest.slice(0, 8)}.t${digest8(thresholds)}.v${valueSetsDigest(valueSets)}${site}`;
}
