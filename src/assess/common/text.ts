/**
 * Text helpers shared by every rule group: numbers, signed changes, units and ages as a prescriber reads them.
 * Pure; no wording of advice lives here (that is cards/catalogue.json), only the sentences of findings.
 */

export function round(value: number, decimals: number): number {
  const f = 10 ** decimals;
  return Math.round(value * f) / f;
}

/** One formatter per number of decimals: Number.toLocaleString builds a new Intl.NumberFormat on every call. */
const numberFormats = new Map<number, Intl.NumberFormat>();

/**
 * A number for a sentence: at most `decimals` decimals, no trailing zeros, thousands separated ("16.9", "2,100").
 * -0 prints "0".
 */
export function fmt(value: number, decimals = 0): string {
  const r0 = round(value, decimals);
  const r = Object.is(r0, -0) ? 0 : r0;
  // Below 1,000 there is no separator to place: the shortest decimal form is what the formatter prints, when it
  // has no more than `decimals` decimals and no exponent (checked, else the formatter decides).
  if (r > -1000 && r < 1000) {
    const s = String(r);
    const dot = s.indexOf('.');
    if (!s.includes('e') && (dot < 0 || s.length - dot - 1 <= decimals)) return s;
  }
  let nf = numberFormats.get(decimals);
  if (!nf) {
    nf = new Intl.NumberFormat('en-US', { maximumFractionDigits: decimals, minimumFractionDigits: 0 });
    numberFormats.set(decimals, nf);
  }
  return nf.format(r);
}

/** "+12.5" / "-3" */
export function signed(v: number, decimals = 1): string {
  const s = fmt(v, decimals);
  return v > 0 && s !== '0' ? `+${s}` : s;
}

/** A signed volume: "+1,200 mL", "−300 mL". */
export function signedMl(ml: number): string {
  return `${ml >= 0 ? '+' : '−'}${fmt(Math.abs(ml))} mL`;
}

/** UCUM unit as a prescriber reads it ("mm[Hg]" → "mmHg"). */
export function displayUnit(ucum: string): string {
  return ucum.replace('mm[Hg]', 'mmHg').replace('cm[H2O]', 'cmH2O').replace(/m2$/, 'm²');
}

/** A label inside a sentence: "Mini fluid challenge" → "mini fluid challenge"; acronyms stay ("PPV"). */
export function inSentence(label: string): string {
  const first = label.split(/\s/)[0] ?? '';
  // Acronyms and chemical names keep their case ("PPV", "FiO2", "SpO2").
  if (label.length < 2 || first.slice(1) !== first.slice(1).toLowerCase() || /\d/.test(first)) return label;
  return `${label[0]?.toLowerCase()}${label.slice(1)}`;
}

/** Plain age for text: "40 min", "5 h", "3 d". */
export function ageText(minutes: number): string {
  if (minutes < 90) return `${Math.round(minutes)} min`;
  if (minutes < 48 * 60) return `${Math.round(minutes / 60)} h`;
  return `${Math.round(minutes / 1440)} d`;
}

/** An age that keeps the minutes where they decide: "91 min", "2 h 1 min", "3 d 2 h". */
export function preciseAge(minutes: number): string {
  const m = Math.round(minutes);
  if (m < 120) return `${m} min`;
  if (m < 48 * 60) return `${Math.floor(m / 60)} h${m % 60 ? ` ${m % 60} min` : ''}`;
  const h = Math.round(m / 60);
  return `${Math.floor(h / 24)} d${h % 24 ? ` ${h % 24} h` : ''}`;
}

export function staleText(ageMin: number, windowMin: number): string {
  return `stale (age ${preciseAge(ageMin)}, window ${preciseAge(windowMin)})`;
}

/** The text with its first letter in upper case (a sentence start). */
export function sentenceStart(text: string): string {
  return text ? `${text[0]?.toUpperCase()}${text.slice(1)}` : text;
}
