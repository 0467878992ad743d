import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { parse } from 'csv-parse/sync';
import type { HistoryAnswer, SessionReport } from '@shared/protocol/record';
import type { LogEntry } from '@shared/protocol/session';
import { drapeUnloadFixture, type Phone } from '../../support/crew';
import { renderSessionReportPdf } from '../../../server/features/record/report-pdf';

/** pdftotext (Debian poppler-utils) reads the PDF back; whitespace folded so wrapped lines compare. */
function pdfText(pdf: Buffer): string {
  const dir = mkdtempSync(join(tmpdir(), 'railcall-pdf-'));
  writeFileSync(join(dir, 'r.pdf'), pdf);
  return fold(execFileSync('pdftotext', ['-enc', 'UTF-8', join(dir, 'r.pdf'), '-'], { encoding: 'utf8' }));
}
const fold = (s: string) => s.replace(/\s+/g, ' ').trim();

describe('the record of a finished session', () => {
  const ctx = drapeUnloadFixture();
  let lastSeq = 0;
  const go = async (phone: Phone, action: Parameters<Phone['must']>[1]) => { lastSeq = await phone.must(ctx.sessionId, action); };
  const get = (path: string, who: Phone = ctx.crew.sm) => request(ctx.t.url).get(path).set('Cookie', who.cookie);

  it('runs the drape unload with a note, a refusal and a hold', async () => {
    const { rail, loader1, loader2, deck, sm } = ctx.crew;
    await go(loader1, { type: 'join', role: 'loader' });
    await go(loader2, { type: 'join', role: 'loader' });
    await go(deck, { type: 'join', role: 'deck' });
    await go(sm, { type: 'join', role: 'stage-manager' });
    await go(rail, { type: 'begin' });
    await go(rail, { type: 'call-move' });
    for (const p of [deck, loader1, loader2]) await go(p, { type: 'answer-clear' });
    await go(rail, { type: 'confirm-locked' });
    await go(loader1, { type: 'call-clear-rail' });
    await go(rail, { type: 'confirm-rail-clear' });
    // Out of order: the drape before its bricks.
    expect((await deck.act(ctx.sessionId, { type: 'confirm-step', stepIndex: 1 })).ok).toBe(false);
    await go(sm, { type: 'call-hold', reason: 'Heads, a clamp on the deck' });
    await go(rail, { type: 'release-hold' });
    await go(loader1, { type: 'confirm-step', stepIndex: 0 });
    await go(deck, { type: 'confirm-step', stepIndex: 1 });
    await go(loader2, { type: 'confirm-step', stepIndex: 2 });
    await go(deck, { type: 'confirm-step', stepIndex: 3 });
    await go(sm, { type: 'note', text: 'Drapes folded and bagged for the truck' });
    await go(loader1, { type: 'call-loading-complete' });
    await go(rail, { type: 'record-test', result: 'balanced' });
    expect(lastSeq).toBeGreaterThan(20);
  });

  it('lists it in the history with its lead, line set and outcome, and filters it', async () => {
    const res = await get('/api/record/sessions');
    expect(res.status).toBe(200);
    const body = res.body as HistoryAnswer;
    const row = body.sessions.find((s) => s.id === ctx.sessionId)!;
    expect(row.leadName).toBe('Jo Castellan');
    expect(row.outcome).toEqual({ kind: 'balanced' });
    expect(row.lineSets[0].name).toMatch(/^Line set 7/);
    const ls7 = row.lineSets[0].scheduleId;
    const other = body.lineSets.find((l) => l.id !== ls7)!.id;
    expect((await get(`/api/record/sessions?lineSetId=${ls7}`)).body.sessions.map((s: { id: number }) => s.id)).toContain(ctx.sessionId);
    expect((await get(`/api/record/sessions?lineSetId=${other}`)).body.sessions).toEqual([]);
    const deck = body.people.find((p) => p.name === 'Robin Ashby')!.id;
    const td = body.people.find((p) => p.name === 'Morgan Vale')!.id;
    expect((await get(`/api/record/sessions?personId=${deck}`)).body.sessions).toHaveLength(1);
    expect((await get(`/api/record/sessions?personId=${td}`)).body.sessions).toEqual([]);
    const today = new Date().toISOString().slice(0, 10);
    expect((await get(`/api/record/sessions?from=${today}&to=${today}`)).body.sessions).toHaveLength(1);
    expect((await get('/api/record/sessions?from=2020-01-01&to=2020-01-31')).body.sessions).toEqual([]);
  });

  it('refuses a backwards date range with a field error', async () => {
    const res = await get('/api/record/sessions?from=2026-12-02&to=2026-12-01');
    expect(res.status).toBe(400);
    expect(res.body.error.fields.to).toEqual(['The end date is before the start date']);
  });

  it('reports crew, plan, balances, holds, refusals, notes, the chain and a chart per line set', async () => {
    const res = await get(`/api/record/sessions/${ctx.sessionId}/report`);
    expect(res.status).toBe(200);
    const report = res.body.report as SessionReport;
    expect(report.entries).toHaveLength(lastSeq);
    expect(report.crew.map((c) => `${c.name}:${c.role}`)).toEqual(['Jo Castellan:rail', 'Sam Brightwater:loader', 'Alex Tamsin:loader', 'Robin Ashby:deck', 'Kit Harrow:stage-manager']);
    expect(report.refusals).toHaveLength(1);
    expect(report.holds).toEqual([expect.objectContaining({ byName: 'Kit Harrow', reason: 'Heads, a clamp on the deck' })]);
    expect(report.notes.map((n) => n.text).join()).toContain('Drapes folded');
    expect(report.chain).toEqual({ ok: true, entries: lastSeq });
    const ls = report.lineSets[0];
    expect(ls.steps.filter((s) => s.loggedAfterKg !== null)).toHaveLength(4);
    // The logged balance after each confirmed step is the plan's: the same applyStep on both sides.
    for (const s of ls.steps) if (s.loggedAfterKg !== null) expect(s.loggedAfterKg).toBeCloseTo(s.plannedAfterKg, 6);
    expect(ls.tests.at(-1)?.result).toBe('balanced');
    expect(report.entries.every((e) => /\d{2}:\d{2}:\d{2} UTC$/.test(e.time))).toBe(true);
    expect(res.body.charts[ls.id]).toMatch(/^<svg/);
    expect(res.body.charts[ls.id]).toContain('Rope lock');
  });

  it('writes every entry into the PDF, to the second (read back with pdftotext)', async () => {
    const res = await get(`/api/record/sessions/${ctx.sessionId}/report.pdf`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const text = pdfText(res.body as Buffer);
    const report = (await get(`/api/record/sessions/${ctx.sessionId}/report`)).body.report as SessionReport;
    for (const e of report.entries) {
      expect(text).toContain(fold(`#${e.seq} ${e.time} ${e.personName}`));
      expect(text).toContain(fold(e.text));
    }
    expect(text).toContain(report.genesisHash);
    expect(text).toContain(report.lastHash);
    expect(text).toContain('Times are UTC');
    expect(text).toContain(report.caution.slice(0, 60));
    // The chart's own words come through svg-to-pdfkit as text.
    expect(text).toContain('Rope lock');
  });

  it('renders the same PDF for mailing, by venue and session', async () => {
    const venueId = (await get('/api/venue')).body.venue.id as number;
    const pdf = await renderSessionReportPdf(ctx.t.db, venueId, ctx.sessionId);
    expect(pdf.subarray(0, 5).toString()).toBe('%PDF-');
    await expect(renderSessionReportPdf(ctx.t.db, venueId + 999, ctx.sessionId)).rejects.toThrow(/not found/);
  });

  it('writes every entry into the CSV, which parses back (csv-parse)', async () => {
    const res = await get(`/api/record/sessions/${ctx.sessionId}/report.csv`);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    const rows = parse(res.text, { columns: true }) as Array<Record<string, string>>;
    const report = (await get(`/api/record/sessions/${ctx.sessionId}/report`)).body.report as SessionReport;
    const entries = rows.filter((r) => r.section === 'entry');
    expect(entries.map((r) => Number(r.seq))).toEqual(report.entries.map((e) => e.seq));
    entries.forEach((r, i) => {
      expect(r.text).toBe(report.entries[i].text);
      expect(r.time).toBe(report.entries[i].time);
      expect(r.hash).toBe(report.entries[i].hash);
    });
    expect(rows.find((r) => r.section === 'chain' && r.kind === 'genesis')?.hash).toBe(report.genesisHash);
    expect(rows.filter((r) => r.section === 'plan')).toHaveLength(report.lineSets[0].steps.length);
    expect(rows.find((r) => r.section === 'session' && r.kind === 'time-zone')?.text).toMatch(/^UTC/);
    expect(rows.filter((r) => r.section === 'crew')).toHaveLength(5);
  });

  it("lists the session and its test on line set 7's own record", async () => {
    const report = (await get(`/api/record/sessions/${ctx.sessionId}/report`)).body.report as SessionReport;
    const history = (await get('/api/record/sessions')).body as HistoryAnswer;
    const ls7 = history.sessions[0].lineSets[0].scheduleId;
    const res = await get(`/api/record/line-sets/${ls7}`);
    expect(res.status).toBe(200);
    expect(res.body.lineSet.number).toBe(7);
    expect(res.body.sessions.map((s: { id: number }) => s.id)).toEqual([ctx.sessionId]);
    expect(res.body.tests).toEqual([expect.objectContaining({ sessionId: ctx.sessionId, result: 'balanced', byName: 'Jo Castellan' })]);
    expect(res.body.tieOffs).toEqual([]);
    expect(report.id).toBe(ctx.sessionId);
    expect((await get('/api/record/line-sets/999999')).status).toBe(404);
  });

  describe('verify', () => {
    const exported = async () => (await get(`/api/sessions/${ctx.sessionId}/record`)).body as { genesisHash: string; entries: LogEntry[] };
    const verify = (file: unknown) => request(ctx.t.url).post('/api/record/verify').set('Cookie', ctx.crew.sm.cookie)
      .send({ fileName: 'record.json', text: typeof file === 'string' ? file : JSON.stringify(file) });

    it('checks the stored chain from the record button', async () => {
      expect((await get(`/api/record/sessions/${ctx.sessionId}/check`)).body.chain).toEqual({ ok: true, entries: lastSeq });
    });

    it('accepts the file as exported', async () => {
      const res = await verify(await exported());
      expect(res.status).toBe(200);
      expect(res.body.chain).toEqual({ ok: true, entries: lastSeq });
      expect(res.body.sessionTitle).toBe('Strike the sea-mist drapes');
    });

    it('names the first entry that breaks: edited, deleted, reordered', async () => {
      const edited = await exported();
      edited.entries[9].details = { ...edited.entries[9].details, imbalanceKg: 0 };
      expect((await verify(edited)).body.chain).toMatchObject({ ok: false, atSeq: 10, problem: 'its content does not match its hash' });

      const deleted = await exported();
      deleted.entries.splice(6, 1);
      expect((await verify(deleted)).body.chain).toMatchObject({ ok: false, atSeq: 8 });

      const reordered = await exported();
      [reordered.entries[4], reordered.entries[5]] = [reordered.entries[5], reordered.entries[4]];
      expect((await verify(reordered)).body.chain).toMatchObject({ ok: false, atSeq: 6 });
    });

    it('catches a changed genesis hash, even with the whole chain rehashed onto it', async () => {
      const changed = await exported();
      changed.genesisHash = 'f'.repeat(64);
      expect((await verify(changed)).body.chain).toMatchObject({ ok: false, atSeq: 0 });
      const { session: _drop, ...anonymous } = changed as typeof changed & { session?: unknown };
      expect((await verify(anonymous)).body.chain).toMatchObject({ ok: false, atSeq: 1, problem: 'not linked to the entry before it' });
    });

    it('refuses a file that is not an export with a field error, and writes nothing', async () => {
      const notJson = await verify('line set,weight\n7,40');
      expect(notJson.status).toBe(400);
      expect(notJson.body.error.fields.file[0]).toMatch(/session record/);
      const wrongShape = await verify({ hello: 'world' });
      expect(wrongShape.status).toBe(400);
      expect(wrongShape.body.error.fields.file[0]).toBe('Not a session record');
      expect((await get(`/api/record/sessions/${ctx.sessionId}/check`)).body.chain.ok).toBe(true);
    });
  });
});
