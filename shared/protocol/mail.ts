import { z } from 'zod';

/**
 * Where a queued message stands. `retry`: a try failed (the mail server was down or refused) and
 * the queue tries again after a back-off; `failed`: it gave up after many tries (kept, can be sent again).
 */
export const MAIL_STATUSES = ['queued', 'sending', 'sent', 'retry', 'failed'] as const;
export type MailStatus = (typeof MAIL_STATUSES)[number];

export const MAIL_KINDS = ['invitation', 'password-reset', 'session-report', 'venue-added'] as const;
export type MailKind = (typeof MAIL_KINDS)[number];

/** One message of the outbox as the technical director sees it. */
export interface MailView {
  id: number;
  kind: MailKind;
  to: string;
  toName: string;
  subject: string;
  status: MailStatus;
  attempts: number;
  /** ISO time of the next try, for `queued` and `retry`. */
  nextAttemptAt: string | null;
  sentAt: string | null;
  createdAt: string;
  /** What went wrong on the last try, in the mail server's words. */
  lastError: string | null;
  attachments: string[];
}

/** The status in the words the screens show. */
export function describeMailStatus(mail: Pick<MailView, 'status' | 'attempts'>): string {
  switch (mail.status) {
    case 'queued': return 'Queued';
    case 'sending': return 'Sending';
    case 'sent': return 'Sent';
    case 'retry': return `Queued, will retry (the mail server did not take it${mail.attempts > 1 ? ` after ${mail.attempts} tries` : ''})`;
    case 'failed': return `Not sent after ${mail.attempts} tries: send it again when the mail server works`;
  }
}

/** Who gets the session report: people of the venue, and any other addresses. */
export const reportMailSchema = z.object({
  personIds: z.array(z.number().int().positive()).max(50).default([]),
  addresses: z.array(z.email('Not an e-mail address').max(254)).max(20).default([]),
  note: z.string().trim().max(1000).optional(),
}).refine((v) => v.personIds.length + v.addresses.length > 0, { path: ['personIds'], message: 'Choose at least one person or address' });
export type ReportMailInput = z.input<typeof reportMailSchema>;

export interface RecipientRow {
  id: number;
  name: string;
  email: string;
}

/** One message the local fake mail server kept (development and tests only). */
export interface MailboxMessage {
  id: string;
  from: string;
  to: string;
  subject: string;
  date: string | null;
  text: string;
  attachments: { index: number; filename: string; contentType: string; size: number }[];
}
