import { describe, expect, it } from 'vitest';
import { dayStartMs, formatStamp, historyQuerySchema, venueTimeZone } from '@shared/protocol/record';

describe('record times', () => {
  it('writes a date and a time to the second in the venue time zone', () => {
    expect(formatStamp(Date.UTC(2026, 11, 2, 14, 5, 9), 'UTC')).toBe('2 Dec 2026, 14:05:09');
    // New York is UTC-5 in December (IANA time zone database).
    expect(formatStamp(Date.UTC(2026, 11, 2, 14, 5, 9), 'America/New_York')).toBe('2 Dec 2026, 09:05:09');
  });

  it('starts a day at local midnight, summer time included', () => {
    expect(dayStartMs('2026-12-02', 'UTC')).toBe(Date.UTC(2026, 11, 2));
    // London keeps summer time (UTC+1) in July, so its midnight is 23:00 UTC the day before (IANA time zone database).
    expect(dayStartMs('2026-07-01', 'Europe/London')).toBe(Date.UTC(2026, 5, 30, 23));
    expect(dayStartMs('2026-12-02', 'America/New_York')).toBe(Date.UTC(2026, 11, 2, 5));
  });

  it('falls back to UTC for a venue without a known time zone', () => {
    expect(venueTimeZone({})).toBe('UTC');
    expect(venueTimeZone({ timeZone: 'Nowhere/Special' })).toBe('UTC');
    expect(venueTimeZone({ timeZone: 'Europe/London' })).toBe('Europe/London');
  });

  it('refuses a backwards date range on the end date, and a date that is not one', () => {
    const backwards = historyQuerySchema.safeParse({ from: '2026-12-02', to: '2026-12-01' });
    expect(backwards.success).toBe(false);
    expect(backwards.error?.issues[0]).toMatchObject({ path: ['to'], message: 'The end date is before the start date' });
    expect(historyQuerySchema.safeParse({ from: '2 Dec' }).error?.issues[0].message).toBe('Give a date as YYYY-MM-DD');
    expect(historyQuerySchema.parse({ lineSetId: '7', from: '2026-12-01', to: '2026-12-01' })).toEqual({ lineSetId: 7, from: '2026-12-01', to: '2026-12-01' });
  });
});
