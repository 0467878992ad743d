import { createRequire } from 'node:module';
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';
import type { DataSource } from 'typeorm';
import { formatMass } from '@shared/rigging';
import { formatZonedStamp, outcomeText, type SessionReport } from '@shared/protocol/record';
import { zoneLabel } from '@shared/protocol/time-zone';
import { ROLE_LABELS } from '@shared/protocol/roles';
import { balanceText } from '@shared/protocol/session';
import { balanceChartSvg } from './chart';
import { RecordService } from './record.service';

// Inter as TrueType (pdfkit embeds TTF/OTF, not the WOFF files of @fontsource/inter), shipped in an npm package.
const require = createRequire(import.meta.url);
const INTER = require.resolve('@expo-google-fonts/inter/400Regular/Inter_400Regular.ttf');
const INTER_BOLD = require.resolve('@expo-google-fonts/inter/700Bold/Inter_700Bold.ttf');

const MARGIN = 40;

/** The session report as a PDF, from the same report object the screen shows. */
export function reportPdf(report: SessionReport): Promise<Buffer> {
  const doc = new PDFDocument({ size: 'A4', margin: MARGIN, bufferPages: true, info: { Title: `Session report: ${report.title}`, Author: 'Railcall' } });
  doc.registerFont('Inter', INTER);
  doc.registerFont('Inter-Bold', INTER_BOLD);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });

  const tz = report.timeZone;
  const at = (ms: number | null) => (ms === null ? '—' : formatZonedStamp(ms, tz));
  const mass = (kg: number) => formatMass(kg, report.units);
  const width = doc.page.width - 2 * MARGIN;
  const heading = (text: string) => {
    doc.moveDown(0.6).font('Inter-Bold').fontSize(12).text(text, MARGIN, undefined, { width }).moveDown(0.2).font('Inter').fontSize(9);
  };
  const line = (text: string) => doc.font('Inter').fontSize(9).text(text, MARGIN, undefined, { width });

  doc.font('Inter-Bold').fontSize(16).text(`Session report: ${report.title}`, { width });
  doc.font('Inter').fontSize(10).text(report.venueName);
  doc.moveDown(0.4).fontSize(9);
  line(`Times are ${zoneLabel(report.openedAtMs, tz)}, to the second.`);
  line(`Opened ${at(report.openedAtMs)} by ${report.createdByName}. Began ${at(report.beganAtMs)}. Ended ${at(report.endedAtMs)}.`);
  line(`Lead: ${report.leadName ?? 'nobody led'}. Outcome: ${outcomeText(report.outcome)}.`);
  if (report.shortCrewReason) line(`Began short of the minimum crew: "${report.shortCrewReason}".`);

  heading('Crew and roles');
  if (!report.crew.length) line('Nobody joined.');
  for (const c of report.crew) line(`${c.name}: ${ROLE_LABELS[c.role]}${c.lead ? ' (lead)' : ''}, joined ${at(c.joinedAtMs)}`);

  for (const ls of report.lineSets) {
    heading(ls.name);
    line(`Rope lock holds ${mass(ls.ropeLockLimitKg)}. Balance before: ${balanceText(ls.beforeKg, report.units)} (computed). After: ${balanceText(ls.afterKg, report.units)} (computed).`);
    const test = ls.tests.at(-1);
    line(test
      ? `Measured at the rail: ${test.result}${test.estimateKg !== null ? `, about ${mass(test.estimateKg)}` : ''}${test.note ? ` ("${test.note}")` : ''}, ${at(test.atMs)}.${ls.tests.length > 1 ? ` ${ls.tests.length} tests in all.` : ''}`
      : 'Measured at the rail: not tested.');
    if (ls.flagged) line('Flagged out of balance.');
    for (const s of ls.steps) {
      line(`${s.index + 1}. ${s.text}: computed after ${balanceText(s.plannedAfterKg, report.units)}${s.loggedAfterKg !== null ? `; logged ${balanceText(s.loggedAfterKg, report.units)} at ${at(s.atMs)}` : s.done ? '; done' : '; not done'}`);
    }
    const chartH = 200;
    if (doc.y + chartH > doc.page.height - MARGIN) doc.addPage();
    const svg = balanceChartSvg(ls, report.units, 520, 240);
    SVGtoPDF(doc, svg, MARGIN, doc.y + 4, { width: Math.min(width, 430), height: chartH, fontCallback: (_f, bold) => (bold ? 'Inter-Bold' : 'Inter') });
    doc.y += chartH + 8;
    doc.x = MARGIN;
  }

  heading('Holds');
  if (!report.holds.length) line('No holds.');
  for (const h of report.holds) line(`Called ${h.calledAt} by ${h.byName}${h.reason ? `: "${h.reason}"` : ' (no reason given)'}; ${h.releasedAt ? `released ${h.releasedAt}, held ${h.heldForS} s` : 'not released'}.`);
  heading('Refusals');
  if (!report.refusals.length) line('None.');
  for (const e of report.refusals) line(`#${e.seq} ${e.time} ${e.text}`);
  heading('Re-alerts');
  if (!report.reAlerts.length) line('None.');
  for (const e of report.reAlerts) line(`#${e.seq} ${e.time} ${e.text}`);
  heading('Notes');
  if (!report.notes.length) line('None.');
  for (const e of report.notes) line(`#${e.seq} ${e.time} ${e.text}`);

  heading(`Every log entry (${report.entries.length})`);
  for (const e of report.entries) {
    doc.font('Inter-Bold').fontSize(8).text(`#${e.seq}  ${e.time}  ${e.personName}${e.role ? ` (${e.role})` : ''}`, MARGIN, undefined, { width, continued: false });
    doc.font('Inter').fontSize(8).text(`${e.text}  [${e.hash.slice(0, 16)}]`, MARGIN + 12, undefined, { width: width - 12 });
  }

  heading('Chain of the record');
  line(`Genesis hash: ${report.genesisHash}`);
  line(`Last entry: #${report.lastSeq}, hash ${report.lastHash}`);
  line(report.chain.ok ? `Checked: all ${report.chain.entries} entries link up from the genesis hash.` : `Check FAILED at entry ${report.chain.atSeq}: ${report.chain.problem}.`);
  heading('Caution');
  line(report.caution);

  // Page numbers on every page.
  const range = doc.bufferedPageRange();
  for (let i = 0; i < range.count; i += 1) {
    doc.switchToPage(range.start + i);
    doc.font('Inter').fontSize(7).text(`${report.title}, page ${i + 1} of ${range.count}`, MARGIN, doc.page.height - MARGIN + 12, { width, align: 'right', lineBreak: false });
  }
  doc.end();
  return done;
}

/** The report of one session as a PDF: for the screen's download and for mailing it. */
export async function renderSessionReportPdf(db: DataSource, venueId: number, sessionId: number): Promise<Buffer> {
  return reportPdf(await new RecordService(db).report(venueId, sessionId));
}
