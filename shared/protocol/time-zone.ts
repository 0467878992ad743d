import { z } from 'zod';

/**
 * IANA time zone names this runtime knows (`Intl.supportedValuesOf('timeZone')`), plus `UTC`:
 * the list holds only geographic zones, and UTC is the zone a venue has until someone sets one.
 */
export function knownTimeZones(): string[] {
  return ['UTC', ...Intl.supportedValuesOf('timeZone')];
}

let known: Set<string> | null = null;
/** IANA spelling: capitalised segments ("America/Argentina/Buenos_Aires", "Etc/GMT+5"). */
const IANA_SPELLING = /^[A-Z][A-Za-z_+-]*(\/[A-Z][A-Za-z0-9_+-]*)*$/;

/**
 * Whether the name is one of `knownTimeZones()`, or a spelling of one: the runtime's list holds one
 * name per zone and, depending on its ICU, the older one (Node 20 lists "Asia/Calcutta", not
 * "Asia/Kolkata"), so a name is also taken when `Intl.DateTimeFormat` resolves it to a listed zone.
 */
export function isKnownTimeZone(name: string): boolean {
  known ??= new Set(knownTimeZones());
  if (known.has(name)) return true;
  if (!IANA_SPELLING.test(name)) return false;
  try {
    return known.has(new Intl.DateTimeFormat('en-US', { timeZone: name }).resolvedOptions().timeZone);
  } catch {
    return false;
  }
}

/** A venue's time zone as a form and a route take it. */
export const timeZoneSchema = z.string({ error: 'Choose a time zone' }).trim()
  .refine(isKnownTimeZone, 'Choose a time zone from the list (an IANA name such as Europe/London or America/Chicago)');

/**
 * The zone this process runs in (Node reads `TZ`, else the system's): a new venue's default.
 * UTC when that is not a known name (e.g. `Etc/UTC`).
 */
export function processTimeZone(): string {
  const zone = new Intl.DateTimeFormat().resolvedOptions().timeZone;
  return zone && isKnownTimeZone(zone) ? zone : 'UTC';
}

/**
 * The zone's offset from UTC at that moment, as "UTC", "UTC+1", "UTC-5" or "UTC+5:30"
 * (read from `Intl.DateTimeFormat`'s `shortOffset` name, which writes it "GMT+1"). No zone: this runtime's own.
 */
export function utcOffsetName(ms: number, timeZone?: string): string {
  const part = new Intl.DateTimeFormat('en-US', { timeZone, timeZoneName: 'shortOffset' }).formatToParts(ms).find((p) => p.type === 'timeZoneName');
  const offset = (part?.value ?? 'GMT').replace(/^GMT/, '');
  return offset === '' || /^[+-]0$/.test(offset) ? 'UTC' : `UTC${offset}`;
}

/** "Europe/Paris (UTC+1)": the zone and its offset at that moment, as reports name it. */
export function zoneLabel(ms: number, timeZone: string): string {
  return timeZone === 'UTC' ? 'UTC' : `${timeZone} (${utcOffsetName(ms, timeZone)})`;
}
