/** Rules version = package version + digest of the card catalogue and the active thresholds (design: replay). */
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { canonicalJson } from '../audit/chain.js';

const pkg = JSON.parse(readFileSync(fileURLToPath(new URL('../../package.json', import.meta.url)), 'utf8')) as { version: string };
export const PACKAGE_VERSION = pkg.version;

export function rulesVersion(catalogueDigest: string, thresholds: unknown): string {
  const t = createHash('sha256').update(canonicalJson(thresholds)).digest('hex').slice(0, 8);
  return `${PACKAGE_VERSION}+c${catalogueDigest.slice(0, 8)}.t${t}`;
}
