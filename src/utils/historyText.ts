import type { VenueUnits } from './venueUnits';

/** A kept value as a person reads it: masses and lengths (stored SI) in the venue's units. */
export function historyValue(field: string, value: unknown, u: VenueUnits): string {
  if (value === null || value === undefined || value === '') return '—';
  if (typeof value === 'number') {
    if (/KgPerM$/.test(field)) return `${u.toPerLength(value)} ${u.perLength}`;
    if (/Kg$/.test(field)) return u.showMass(value);
    if (/M$/.test(field)) return u.showLength(value);
    return String(value);
  }
  if (Array.isArray(value)) return value.map((v) => (typeof v === 'number' && /M$/.test(field) ? u.showLength(v) : String(v))).join('; ');
  if (typeof value === 'object') return Object.entries(value as Record<string, unknown>).map(([k, v]) => `${k}: ${v}`).join(', ');
  return String(value);
}
