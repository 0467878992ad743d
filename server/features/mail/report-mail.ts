import type { DataSource } from 'typeorm';
import type { MailView, ReportMailInput } from '@shared/protocol/mail';
import { reportMailSchema } from '@shared/protocol/mail';
import type { z } from 'zod';
import { HttpError } from '../../middleware/http-error';
import { Venue } from '../venue/venue.entity';
import type { PeopleService, SignedInUser } from '../people/people.service';
import type { RecordService } from '../record/record.service';
import { fileName } from '../record/record.routes';
import { reportPdf } from '../record/report-pdf';
import { toMailView, type MailQueue } from './mail-queue';
import { sessionReportText } from './messages';

/** A session's report as a file to attach. */
export interface SessionReportFile {
  title: string;
  filename: string;
  contentType: string;
  content: Buffer;
}

/** Renders the report of a session the person may see (throws not-found otherwise). */
export type RenderSessionReport = (user: SignedInUser, sessionId: number) => Promise<SessionReportFile>;

/** The session report as PDF, as `GET /api/record/sessions/:id/report.pdf` gives it. */
export function pdfReportRenderer(record: RecordService): RenderSessionReport {
  return async (user, sessionId) => {
    const report = await record.report(user.venueId, sessionId);
    return { title: report.title, filename: fileName(report.id, report.title, 'pdf'), contentType: 'application/pdf', content: await reportPdf(report) };
  };
}

/** Mails a session's report to the people (and addresses) the sender chose: one queued message each. */
export class ReportMailer {
  constructor(
    private readonly db: DataSource,
    private readonly queue: MailQueue,
    private readonly people: PeopleService,
    private readonly render: RenderSessionReport,
  ) {}

  async send(user: SignedInUser, sessionId: number, input: z.output<typeof reportMailSchema> | ReportMailInput): Promise<MailView[]> {
    const { personIds, addresses, note } = reportMailSchema.parse(input);
    const crew = await this.people.recipients(user.venueId);
    const unknown = personIds.filter((id) => !crew.some((p) => p.id === id));
    if (unknown.length) {
      throw new HttpError('bad-input', 'Some of the people chosen cannot get mail here (not at this venue, or not signed up).', {
        personIds: [`Not someone at this venue who can get mail: ${unknown.join(', ')}`],
      });
    }
    const report = await this.render(user, sessionId);
    const venue = await this.db.getRepository(Venue).findOneByOrFail({ id: user.venueId });
    // One message per address, people first with their names.
    const to = new Map<string, { name: string; address: string; personId: number | null }>();
    for (const p of crew.filter((c) => personIds.includes(c.id))) to.set(p.email, { name: p.name, address: p.email, personId: p.id });
    for (const a of addresses) if (!to.has(a.toLowerCase())) to.set(a.toLowerCase(), { name: '', address: a.toLowerCase(), personId: null });
    const words = sessionReportText({ venueName: venue.name, title: report.title, sentBy: user.name, note, filename: report.filename });
    const rows = await this.db.transaction(async (m) => {
      const out = [];
      for (const r of to.values()) {
        out.push(await this.queue.enqueue(m, {
          venueId: user.venueId,
          personId: r.personId,
          kind: 'session-report',
          to: { name: r.name, address: r.address },
          ...words,
          attachments: [{ filename: report.filename, contentType: report.contentType, content: report.content }],
        }));
      }
      return out;
    });
    this.queue.kick();
    return rows.map((r) => toMailView(r, [report.filename]));
  }
}
