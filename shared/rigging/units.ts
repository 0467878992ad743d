/**
 * Exact unit conversions and the words a screen shows. Code keeps SI (kg, m); venues choose
 * how they see it. The factors are exact by definition (1959 international yard and pound; NIST SP 811).
 */

import type { Units } from './types';

/** 1 lb = 0.45359237 kg exactly. */
export const KG_PER_LB = 0.45359237;
/** 1 ft = 0.3048 m exactly. */
export const M_PER_FT = 0.3048;
/** 1 in = 0.0254 m exactly. */
export const M_PER_IN = 0.0254;

export const lbToKg = (lb: number): number => lb * KG_PER_LB;
export const kgToLb = (kg: number): number => kg / KG_PER_LB;
export const ftToM = (ft: number): number => ft * M_PER_FT;
export const mToFt = (m: number): number => m / M_PER_FT;
export const inToM = (inches: number): number => inches * M_PER_IN;
export const mToIn = (m: number): number => m / M_PER_IN;

/** Rounds to `decimals` places and drops a trailing ".0", so 40 lb reads "40", not "40.0". */
function trimNumber(value: number, decimals: number): string {
  const rounded = Number(value.toFixed(decimals));
  // -0 would print as "0" anyway, but keep tiny negatives from showing as "-0".
  return (Object.is(rounded, -0) ? 0 : rounded).toString();
}

/** A mass for a screen: "40 lb" (imperial, to 0.1 lb) or "18.1 kg" (metric, to 0.1 kg). */
export function formatMass(kg: number, units: Units): string {
  return units === 'imperial' ? `${trimNumber(kgToLb(kg), 1)} lb` : `${trimNumber(kg, 1)} kg`;
}

/** A length for a screen: feet and inches to the nearest inch (12' 6") or metres to the centimetre ("3.05 m"). */
export function formatLength(m: number, units: Units): string {
  if (units === 'metric') return `${trimNumber(m, 2)} m`;
  const totalIn = Math.round(Math.abs(mToIn(m)));
  const sign = m < 0 && totalIn > 0 ? '-' : '';
  const feet = Math.floor(totalIn / 12);
  const inches = totalIn % 12;
  return `${sign}${feet}' ${inches}"`;
}

const DECIMAL_PATTERN = /^[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)$/;

/**
 * Reads a number typed by a person: "40.5", or "40,5" with a decimal comma. A comma before exactly
 * three digits after 1 to 3 others ("1,500") is refused: it reads as 1500 in one country and 1.5 in
 * another. Throws an Error with plain words on anything that is not one number.
 */
export function parseDecimal(text: string): number {
  const t = text.trim();
  if (!DECIMAL_PATTERN.test(t)) throw new Error(`"${text.trim()}" is not a number: write it like 40.5 or 40,5.`);
  if (/^[+-]?[1-9]\d{0,2},\d{3}$/.test(t)) {
    const [whole, part] = t.split(',');
    const small = String(Number(`${whole}.${part}`));
    throw new Error(`"${t}" could be ${whole}${part} or ${small}: write ${whole}${part} without the comma, or ${small} with a point.`);
  }
  return Number(t.replace(',', '.'));
}

/** A field's text as a number: null when empty, NaN when it is not a number (parseDecimal says why). */
export function readDecimal(text: string | number | null | undefined): number | null {
  if (text === null || text === undefined) return null;
  if (typeof text === 'number') return text;
  if (!text.trim()) return null;
  try {
    return parseDecimal(text);
  } catch {
    return Number.NaN;
  }
}

/**
 * Several numbers typed in one field ("2; 11; 20", "2, 11, 20", "2; 11,5; 20"): split on semicolons
 * when there is one (commas are then decimal commas), else on commas. Each as readDecimal reads it.
 */
export function readDecimalList(text: string): number[] {
  const parts = text.includes(';') ? text.split(';') : text.split(',');
  return parts.map((p) => p.trim()).filter(Boolean).map((p) => readDecimal(p) as number);
}

const MASS_PATTERN = /^\s*(-?\d+(?:[.,]\d+)?|-?[.,]\d+)\s*(lbs?|#|pounds?|kg|kgs|kilos?|kilograms?)?\s*$/i;

/**
 * Reads a mass typed by a person, in kg. A number alone is taken in the venue's units;
 * an explicit unit ("40 lb", "18 kg") wins. Throws an Error with plain words on anything else.
 */
export function parseMass(value: string | number, units: Units): number {
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new Error('Enter a weight as a number.');
    return units === 'imperial' ? lbToKg(value) : value;
  }
  const match = MASS_PATTERN.exec(value);
  if (!match) throw new Error(`"${value}" is not a weight: enter a number, e.g. 40 lb or 18 kg.`);
  const amount = parseDecimal(match[1]);
  const unit = match[2]?.toLowerCase();
  const imperial = unit ? !unit.startsWith('k') : units === 'imperial';
  return imperial ? lbToKg(amount) : amount;
}

const FEET_INCHES_PATTERN = /^\s*(?:(\d+(?:[.,]\d+)?)\s*(?:'|ft|feet|foot))?\s*(?:(\d+(?:[.,]\d+)?)\s*(?:"|in|inch|inches)?)?\s*$/i;
const METRES_PATTERN = /^\s*(\d+(?:[.,]\d+)?|[.,]\d+)\s*(m|metres?|meters?)?\s*$/i;

/**
 * Reads a length typed by a person, in metres: imperial as 12' 6", 12 ft 6 in, 12' or 150 in... a bare
 * number in imperial is feet; metric as "3.05" or "3.05 m". Throws an Error with plain words on anything else.
 */
export function parseLength(value: string, units: Units): number {
  if (units === 'metric' || /m(et(er|re)s?)?\s*$/i.test(value)) {
    const match = METRES_PATTERN.exec(value);
    if (!match) throw new Error(`"${value}" is not a length: enter metres, e.g. 3.05 m.`);
    return parseDecimal(match[1]);
  }
  const bare = /^\s*(\d+(?:[.,]\d+)?)\s*$/.exec(value);
  if (bare) return ftToM(parseDecimal(bare[1]));
  const match = FEET_INCHES_PATTERN.exec(value);
  if (!match || (match[1] === undefined && match[2] === undefined)) {
    throw new Error(`"${value}" is not a length: enter feet and inches, e.g. 12' 6".`);
  }
  return ftToM(parseDecimal(match[1] ?? '0')) + inToM(parseDecimal(match[2] ?? '0'));
}
