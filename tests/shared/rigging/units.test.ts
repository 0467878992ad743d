import { describe, expect, it } from 'vitest';
import {
  formatLength, formatMass, ftToM, kgToLb, KG_PER_LB, lbToKg, M_PER_FT, mToFt, parseDecimal, parseLength, parseMass, readDecimal, readDecimalList,
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

describe('parseDecimal', () => {
  it('reads a decimal point or a decimal comma alike (common practice: both are written)', () => {
    expect(parseDecimal('40.5')).toBe(40.5);
    expect(parseDecimal('40,5')).toBe(40.5);
    expect(parseDecimal(' 0,125 ')).toBe(0.125);
    expect(parseDecimal(',5')).toBe(0.5);
    expect(parseDecimal('-3')).toBe(-3);
    expect(parseDecimal('12')).toBe(12);
  });

  it('refuses a comma that could be a thousands separator, saying both readings', () => {
    expect(() => parseDecimal('1,500')).toThrow('"1,500" could be 1500 or 1.5: write 1500 without the comma, or 1.5 with a point.');
    expect(parseDecimal('1,50')).toBe(1.5);
    expect(parseDecimal('1500,5')).toBe(1500.5);
  });

  it('refuses anything that is not one number, in words', () => {
    for (const bad of ['', 'abc', '1.2.3', '1,2,3', '1.2,3', '4 0', '--1']) {
      expect(() => parseDecimal(bad)).toThrow(/is not a number: write it like 40.5 or 40,5/);
    }
  });
});

describe('readDecimal', () => {
  it('answers null for an empty field, the number for a number, NaN for text that is not one', () => {
    expect(readDecimal('')).toBeNull();
    expect(readDecimal('  ')).toBeNull();
    expect(readDecimal(null)).toBeNull();
    expect(readDecimal(7)).toBe(7);
    expect(readDecimal('40,5')).toBe(40.5);
    expect(readDecimal('forty')).toBeNaN();
  });
});

describe('parseMass and parseLength with a decimal comma', () => {
  it('reads "40,5" as 40.5 in the venue\'s units or the unit typed', () => {
    expect(parseMass('40,5', 'imperial')).toBeCloseTo(lbToKg(40.5), 12);
    expect(parseMass('18,2 kg', 'imperial')).toBeCloseTo(18.2, 12);
    expect(parseLength('3,05', 'metric')).toBeCloseTo(3.05, 12);
    expect(parseLength('3,05 m', 'imperial')).toBeCloseTo(3.05, 12);
    expect(parseLength('12,5', 'imperial')).toBeCloseTo(ftToM(12.5), 12);
    expect(parseLength(`12' 6,5"`, 'imperial')).toBeCloseTo(ftToM(12) + 0.0254 * 6.5, 12);
  });

  it('refuses the ambiguous "1,500 lb" rather than guess', () => {
    expect(() => parseMass('1,500', 'imperial')).toThrow(/could be 1500 or 1.5/);
  });
});

describe('readDecimalList', () => {
  it('splits on semicolons when there is one, so commas can be decimal commas; else on commas', () => {
    expect(readDecimalList('2; 11,5; 20')).toEqual([2, 11.5, 20]);
    expect(readDecimalList('2, 11, 20')).toEqual([2, 11, 20]);
    expect(readDecimalList('2;11.5;20;')).toEqual([2, 11.5, 20]);
    expect(readDecimalList('2; x')[1]).toBeNaN();
  });
});
