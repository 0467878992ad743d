import { KG_PER_LB, M_PER_FT, formatLength, formatMass, type Units } from '@shared/rigging';

/**
 * Numbers as a venue types and reads them: feet and pounds, or metres and kilograms.
 * The factors are exact (1 lb = 0.45359237 kg, 1 ft = 0.3048 m); stored values stay SI.
 */
export function venueUnits(units: Units) {
  const imperial = units === 'imperial';
  const round = (v: number, d = 4) => Number(v.toFixed(d));
  return {
    units,
    length: imperial ? 'ft' : 'm',
    mass: imperial ? 'lb' : 'kg',
    perLength: imperial ? 'lb/ft' : 'kg/m',
    /** SI -> the number shown in a field. */
    toLength: (m: number | null) => (m === null ? null : round(imperial ? m / M_PER_FT : m)),
    toMass: (kg: number | null) => (kg === null ? null : round(imperial ? kg / KG_PER_LB : kg)),
    toPerLength: (kgPerM: number) => round(imperial ? (kgPerM / KG_PER_LB) * M_PER_FT : kgPerM),
    /** A field's number -> SI. */
    fromLength: (v: number | null) => (v === null ? null : imperial ? v * M_PER_FT : v),
    fromMass: (v: number | null) => (v === null ? null : imperial ? v * KG_PER_LB : v),
    fromPerLength: (v: number) => (imperial ? (v * KG_PER_LB) / M_PER_FT : v),
    showLength: (m: number | null) => (m === null ? '—' : formatLength(m, units)),
    showMass: (kg: number) => formatMass(kg, units),
  };
}
export type VenueUnits = ReturnType<typeof venueUnits>;

/** "pipe-heavy by 4 lb", "arbor-heavy by 12 lb", "in balance". */
export function balanceWords(imbalanceKg: number, u: VenueUnits): string {
  if (Math.abs(imbalanceKg) < 0.005) return 'in balance';
  return `${imbalanceKg > 0 ? 'pipe-heavy' : 'arbor-heavy'} by ${u.showMass(Math.abs(imbalanceKg))}`;
}
