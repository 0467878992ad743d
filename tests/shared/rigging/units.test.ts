import { describe, expect, it } from 'vitest';
import {
  formatLength, formatMass, ftToM, kgToLb, KG_PER_LB, lbToKg, M_PER_FT, mToFt, parseLength, parseMass,
} from '@shared/rigging';

describe('unit conversions', () => {
  it('uses the exact definitions (NIST SP 811; 1959 international yard and pound)', () => {
    expect(KG_PER_LB).toBe(0.45359237);
    expect(M_PER_FT).toBe(0.3048);
    expect(lbToKg(1)).toBe(0.45359237);
    expect(ftToM(10)).toBeCloseTo(3.048, 12);
    expect(kgToLb(lbToKg(50))).toBeCloseTo(50, 12);
    expect(mToFt(ftToM(12.5))).toBeCloseTo(12.5, 12);
  });
});

describe('formatMass', () => {
  it('shows pounds or kilograms to a tenth, without a trailing .0', () => {
    expect(formatMass(lbToKg(40), 'imperial')).toBe('40 lb');
    expect(formatMass(18.1, 'metric')).toBe('18.1 kg');
    expect(formatMass(18, 'metric')).toBe('18 kg');
    expect(formatMass(lbToKg(2.54), 'imperial')).toBe('2.5 lb');
  });
});

describe('formatLength', () => {
  it("shows feet and inches to the nearest inch, carrying 12 inches to a foot", () => {
    expect(formatLength(ftToM(12.5), 'imperial')).toBe(`12' 6"`);
    expect(formatLength(ftToM(10), 'imperial')).toBe(`10' 0"`);
    expect(formatLength(ftToM(3) + 0.0254 * 11.8, 'imperial')).toBe(`4' 0"`);
    expect(formatLength(3.048, 'metric')).toBe('3.05 m');
  });
});

describe('parseMass', () => {
  it('reads a bare number in the venue units and an explicit unit as written', () => {
    expect(parseMass('40', 'imperial')).toBeCloseTo(40 * 0.45359237, 12);
    expect(parseMass('18.1', 'metric')).toBe(18.1);
    expect(parseMass('18 kg', 'imperial')).toBe(18);
    expect(parseMass('25 lbs', 'metric')).toBeCloseTo(25 * 0.45359237, 12);
    expect(parseMass(10, 'imperial')).toBeCloseTo(4.5359237, 12);
  });

  it('refuses what is not a weight, in plain words', () => {
    expect(() => parseMass('heavy', 'metric')).toThrow(/not a weight/);
  });
});

describe('parseLength', () => {
  it('reads feet and inches, bare feet, and metres', () => {
    expect(parseLength(`12' 6"`, 'imperial')).toBeCloseTo(ftToM(12.5), 12);
    expect(parseLength('12 ft 6 in', 'imperial')).toBeCloseTo(ftToM(12.5), 12);
    expect(parseLength('40', 'imperial')).toBeCloseTo(ftToM(40), 12);
    expect(parseLength('3.05 m', 'imperial')).toBe(3.05);
    expect(parseLength('3.05', 'metric')).toBe(3.05);
    expect(() => parseLength('long', 'imperial')).toThrow(/not a length/);
  });
});
