import { describe, expect, it } from 'vitest';
import { BATTEN_PIPE_SIZES, kgToLb, M_PER_FT, pipeMassPerMetre, STEEL_DENSITY_KG_M3 } from '@shared/rigging';

describe('pipeMassPerMetre', () => {
  it('gives 4.05 kg/m (2.72 lb/ft) for NPS 1-1/2 Schedule 40 (ASME B36.10M table)', () => {
    const kgPerM = pipeMassPerMetre({ outsideDiameterMm: 1.9 * 25.4, wallMm: 0.145 * 25.4 });
    expect(kgPerM).toBeCloseTo(4.05, 2);
    expect(kgToLb(kgPerM * M_PER_FT)).toBeCloseTo(2.72, 2);
  });

  it('matches the SI weight formula 0.0246615 × (OD − t) × t (ASME B36.10M)', () => {
    for (const size of BATTEN_PIPE_SIZES) {
      const formula = 0.0246615 * (size.outsideDiameterMm - size.wallMm) * size.wallMm;
      expect(pipeMassPerMetre(size)).toBeCloseTo(formula, 4);
    }
  });

  it('matches the inch weight formula 10.69 × (OD − t) × t lb/ft (ASME B36.10M)', () => {
    const lbPerFt = kgToLb(pipeMassPerMetre({ outsideDiameterMm: 2.375 * 25.4, wallMm: 0.154 * 25.4 }) * M_PER_FT);
    expect(lbPerFt).toBeCloseTo(10.69 * (2.375 - 0.154) * 0.154, 2);
  });

  it('defaults to steel at 7850 kg/m³ and scales with density (engineering handbooks)', () => {
    expect(STEEL_DENSITY_KG_M3).toBe(7850);
    const steel = pipeMassPerMetre({ outsideDiameterMm: 48.26, wallMm: 3.68 });
    const aluminium = pipeMassPerMetre({ outsideDiameterMm: 48.26, wallMm: 3.68, densityKgM3: 2700 });
    expect(aluminium / steel).toBeCloseTo(2700 / 7850, 12);
  });

  it('lists the common Schedule 40 weights: 2.27, 2.72, 3.65 lb/ft (from memory of the ASME B36.10M table)', () => {
    const lbPerFt = (nps: string) => {
      const size = BATTEN_PIPE_SIZES.find((s) => s.nps === nps && s.schedule === '40')!;
      return kgToLb(pipeMassPerMetre(size) * M_PER_FT);
    };
    expect(lbPerFt('1-1/4')).toBeCloseTo(2.27, 1);
    expect(lbPerFt('1-1/2')).toBeCloseTo(2.72, 1);
    expect(lbPerFt('2')).toBeCloseTo(3.65, 1);
  });

  it('refuses a wall thicker than the radius', () => {
    expect(() => pipeMassPerMetre({ outsideDiameterMm: 10, wallMm: 6 })).toThrow(RangeError);
  });
});
