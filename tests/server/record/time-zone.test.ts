import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { parse } from 'csv-parse/sync';
import type { HistoryAnswer, SessionReport } from '@shared/protocol/record';
import { DEFAULT_SETTINGS, type VenueView } from '@shared/protocol/schedule';
import { drapeUnloadFixture } from '../../support/crew';
import { signedIn, type Agent } from '../../support/people';

/**
 * The reference for every local time below is the runtime's own `Intl.DateTimeFormat` with the IANA
 * zone database (ECMA-402), not Railcall's formatting: Asia/Kolkata is UTC+5:30 all year (no summer time).
 */
const ZONE = 'Asia/Kolkata';
function referenceClock(ms: number): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone: ZONE, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' }).format(ms);
}
function referenceDay(ms: number): string {
  return new Intl.DateTimeFormat('en-GB', { timeZone: ZONE, day: 'numeric', month: 'short', year: 'numeric' }).format(ms);
}

function pdfText(pdf: Buffer): string {
  const dir = mkdtempSync(join(tmpdir(), 'railcall-pdf-'));
  writeFileSync(join(dir, 'r.pdf'), pdf);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', join(dir, 'r.pdf'), '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
}

describe("the venue's time zone", () => {
  const ctx = drapeUnloadFixture();
  let td: Agent;
  let venue: VenueView;
  const get = (path: string) => request(ctx.t.url).get(path).set('Cookie', ctx.crew.sm.cookie);

  it('is a setting, UTC on a server that runs in UTC, and is kept in the history when changed', async () => {
    td = await signedIn(ctx.t.url, 'td@larkspur.example');
    venue = (await td.get('/api/venue')).body.venue as VenueView;
    // The test runner starts the server without TZ: the system zone of this machine, UTC.
    expect(venue.settings.timeZone).toBe('UTC');
    const saved = await td.put('/api/venue').send({ name: venue.name, units: venue.units, settings: { ...venue.settings, timeZone: ZONE }, reason: 'Touring in India' });
    expect(saved.status, JSON.stringify(saved.body)).toBe(200);
    expect(saved.body.venue.settings.timeZone).toBe(ZONE);
    const history = await td.get('/api/venue/history');
    expect(history.body.entries[0]).toMatchObject({ subject: 'venue', reason: 'Touring in India', changes: { timeZone: ['UTC', ZONE] } });
    // Every phone learns it with who is signed in.
    expect((await get('/api/me')).body.venue.timeZone).toBe(ZONE);
  });

  it('refuses a zone that is not an IANA name with a field error, and writes nothing', async () => {
    const before = (await td.get('/api/venue/history')).body.entries.length as number;
    for (const timeZone of ['Mars/Olympus_Mons', 'GMT+5', '', 'asia/kolkata']) {
      const res = await td.put('/api/venue').send({ name: venue.name, units: venue.units, settings: { ...DEFAULT_SETTINGS, timeZone } });
      expect(res.status).toBe(400);
      expect(res.body.error.fields['settings.timeZone'][0]).toMatch(/Choose a time zone/);
      expect(res.body.error.message).toMatch(/time zone/);
    }
    expect((await td.get('/api/venue')).body.venue.settings.timeZone).toBe(ZONE);
    expect((await td.get('/api/venue/history')).body.entries).toHaveLength(before);
  });

  it('shows the report in local time with the offset named, on screen, in the PDF and in the CSV', async () => {
    const { rail, sm } = ctx.crew;
    await sm.must(ctx.sessionId, { type: 'join', role: 'stage-manager' });
    await sm.must(ctx.sessionId, { type: 'note', text: 'Crew call moved to the evening' });
    await rail.must(ctx.sessionId, { type: 'end', reason: 'Get-out postponed' });

    const report = (await get(`/api/record/sessions/${ctx.sessionId}/report`)).body.report as SessionReport;
    expect(report.timeZone).toBe(ZONE);
    expect(report.entries.length).toBeGreaterThan(3);
    for (const e of report.entries) {
      expect(e.time).toBe(`${referenceDay(e.atMs)}, ${referenceClock(e.atMs)} UTC+5:30`);
      // And not the UTC clock (5 h 30 min apart).
      expect(e.time).not.toContain(new Date(e.atMs).toISOString().slice(11, 19));
    }

    const pdf = await get(`/api/record/sessions/${ctx.sessionId}/report.pdf`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    const text = pdfText(pdf.body as Buffer);
    expect(text).toContain(`Times are ${ZONE} (UTC+5:30), to the second.`);
    for (const e of report.entries) expect(text).toContain(`#${e.seq} ${referenceDay(e.atMs)}, ${referenceClock(e.atMs)} UTC+5:30`);

    const csv = await get(`/api/record/sessions/${ctx.sessionId}/report.csv`);
    const rows = parse(csv.text, { columns: true }) as Array<Record<string, string>>;
    expect(rows.find((r) => r.section === 'session' && r.kind === 'time-zone')?.text).toBe(`${ZONE} (UTC+5:30)`);
    const entries = rows.filter((r) => r.section === 'entry');
    expect(entries).toHaveLength(report.entries.length);
    for (const r of entries) {
      const ms = Date.parse(r.time_utc);
      expect(r.time).toBe(`${referenceDay(ms)}, ${referenceClock(ms)} UTC+5:30`);
    }
  });

  it('lists the history in the venue zone, whose days decide the date filter', async () => {
    const answer = (await get('/api/record/sessions')).body as HistoryAnswer;
    expect(answer.timeZone).toBe(ZONE);
    const row = answer.sessions.find((s) => s.id === ctx.sessionId)!;
    const localDay = new Intl.DateTimeFormat('en-CA', { timeZone: ZONE, year: 'numeric', month: '2-digit', day: '2-digit' }).format(row.startedAtMs);
    expect((await get(`/api/record/sessions?from=${localDay}&to=${localDay}`)).body.sessions.map((s: { id: number }) => s.id)).toContain(ctx.sessionId);
  });
});
