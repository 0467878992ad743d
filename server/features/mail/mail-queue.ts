import nodemailer, { type Transporter } from 'nodemailer';
import { In, type DataSource, type EntityManager } from 'typeorm';
import type { MailKind, MailView } from '@shared/protocol/mail';
import type { MailConfig } from '../../config';
import type { Logger } from '../../logger';
import { retryOnDeadlock } from '../../db/retry';
import { MailAttachmentRow, MailMessageRow } from './mail.entity';

export interface OutgoingMail {
  venueId: number | null;
  personId?: number | null;
  kind: MailKind;
  to: { name: string; address: string };
  subject: string;
  text: string;
  attachments?: { filename: string; contentType: string; content: Buffer }[];
}

/** How long a sender holds a claimed message before another may take it (a sender that died mid-send). */
const LEASE_MS = 2 * 60 * 1000;
const BATCH = 10;

/** The wait before try number `attempt + 1`: base doubled per try, capped. */
export function retryDelayMs(attempt: number, baseMs: number, maxMs: number): number {
  return Math.min(maxMs, baseMs * 2 ** Math.max(0, attempt - 1));
}

export function toMailView(row: MailMessageRow, attachments: string[] = []): MailView {
  return {
    id: row.id,
    kind: row.kind,
    to: row.toAddress,
    toName: row.toName,
    subject: row.subject,
    status: row.status,
    attempts: row.attempts,
    nextAttemptAt: row.status === 'queued' || row.status === 'retry' ? row.nextAttemptAt.toISOString() : null,
    sentAt: row.sentAt?.toISOString() ?? null,
    createdAt: row.createdAt.toISOString(),
    lastError: row.lastError,
    attachments,
  };
}

/**
 * Mail goes out only from this queue in MariaDB. A message is written in the same transaction as
 * what it announces (an invitation, a reset), so a crash or a mail server that is down loses nothing:
 * the sender claims due rows (`FOR UPDATE SKIP LOCKED`, so two servers never send one twice), tries
 * them, and puts failures back with a back-off. The poll timer lives in this process; every server
 * may run one, the row locks keep them apart.
 */
export class MailQueue {
  private readonly transport: Transporter | null;
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<void> | null = null;
  private again = false;
  private readonly sentListeners = new Set<(row: MailMessageRow) => void>();

  constructor(private readonly db: DataSource, private readonly config: MailConfig, private readonly logger: Logger) {
    const smtp = config.smtp;
    this.transport = smtp
      ? nodemailer.createTransport({
        host: smtp.host,
        port: smtp.port,
        secure: smtp.secure,
        auth: smtp.user ? { user: smtp.user, pass: smtp.password ?? '' } : undefined,
        // A mail server that is down should fail a try quickly, not hold the sender for minutes.
        connectionTimeout: 10_000,
        greetingTimeout: 10_000,
        socketTimeout: 30_000,
      })
      : null;
  }

  /** Queues a message inside the caller's transaction; it is sent once that commits (call `kick`). */
  async enqueue(m: EntityManager, mail: OutgoingMail): Promise<MailMessageRow> {
    const now = new Date();
    const row = await m.getRepository(MailMessageRow).save(m.getRepository(MailMessageRow).create({
      venueId: mail.venueId,
      personId: mail.personId ?? null,
      kind: mail.kind,
      toAddress: mail.to.address,
      toName: mail.to.name,
      subject: mail.subject,
      bodyText: mail.text,
      status: 'queued',
      attempts: 0,
      nextAttemptAt: now,
      leaseUntil: null,
      lastError: null,
      createdAt: now,
      sentAt: null,
    }));
    for (const a of mail.attachments ?? []) {
      await m.getRepository(MailAttachmentRow).insert({ messageId: row.id, filename: a.filename, contentType: a.contentType, content: a.content });
    }
    return row;
  }

  /** Starts the poll timer (due retries are picked up even when nothing new is queued). */
  start(): void {
    if (!this.transport) {
      this.logger.warn('no mail server is set (RAILCALL_SMTP_HOST): mail waits in the queue until one is');
      return;
    }
    if (this.timer) return;
    this.timer = setInterval(() => this.kick(), this.config.pollMs);
    this.timer.unref();
    this.kick();
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    this.again = false;
    await this.running;
    this.transport?.close();
  }

  /** Runs the sender now (after a commit that queued mail); one run at a time per process. */
  kick(): void {
    if (!this.transport) return;
    if (this.running) {
      this.again = true;
      return;
    }
    this.running = this.drain()
      .then(() => undefined, (error: unknown) => this.logger.error({ err: error }, 'mail queue run failed'))
      .finally(() => {
        this.running = null;
        if (this.again) {
          this.again = false;
          this.kick();
        }
      });
  }

  /** Called with each message once the mail server has taken it. */
  onSent(listener: (row: MailMessageRow) => void): () => void {
    this.sentListeners.add(listener);
    return () => this.sentListeners.delete(listener);
  }

  /** Sends due messages until none are left; answers how many went out. */
  async drain(): Promise<number> {
    let sent = 0;
    for (;;) {
      const batch = await this.claim();
      if (batch.length === 0) return sent;
      for (const row of batch) if (await this.sendOne(row)) sent++;
    }
  }

  /** Marks claimed rows `sending` with a lease and commits at once: no lock is held while mail goes out. */
  private async claim(): Promise<MailMessageRow[]> {
    // Two senders' claims can deadlock on the due index; the loser claims again.
    return retryOnDeadlock(() => this.db.transaction(async (m) => {
      const now = new Date();
      const ids: { id: number }[] = await m.query(
        `SELECT id FROM mail_message
          WHERE (status IN ('queued', 'retry') AND next_attempt_at <= ?) OR (status = 'sending' AND lease_until < ?)
          ORDER BY next_attempt_at, id LIMIT ${BATCH} FOR UPDATE SKIP LOCKED`,
        [now, now],
      );
      if (ids.length === 0) return [];
      const list = ids.map((r) => r.id);
      await m.createQueryBuilder().update(MailMessageRow)
        .set({ status: 'sending', leaseUntil: new Date(now.getTime() + LEASE_MS), attempts: () => 'attempts + 1' })
        .where({ id: In(list) }).execute();
      return m.getRepository(MailMessageRow).find({ where: { id: In(list) }, order: { id: 'ASC' } });
    }));
  }

  private async sendOne(row: MailMessageRow): Promise<boolean> {
    const repo = this.db.getRepository(MailMessageRow);
    const attachments = await this.db.getRepository(MailAttachmentRow).find({ where: { messageId: row.id }, order: { id: 'ASC' } });
    try {
      await this.transport!.sendMail({
        from: this.config.from,
        to: { name: row.toName, address: row.toAddress },
        subject: row.subject,
        text: row.bodyText,
        headers: { 'X-Railcall-Message': String(row.id) },
        attachments: attachments.map((a) => ({ filename: a.filename, contentType: a.contentType, content: a.content })),
      });
      // Only the sender holding the lease records the outcome.
      await retryOnDeadlock(() => repo.update({ id: row.id, status: 'sending' }, { status: 'sent', sentAt: new Date(), leaseUntil: null, lastError: null }));
      for (const listener of this.sentListeners) listener(row);
      return true;
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      const giveUp = row.attempts >= this.config.maxAttempts;
      const next = new Date(Date.now() + retryDelayMs(row.attempts, this.config.retryBaseMs, this.config.retryMaxMs));
      await retryOnDeadlock(() => repo.update({ id: row.id, status: 'sending' }, {
        status: giveUp ? 'failed' : 'retry',
        nextAttemptAt: next,
        leaseUntil: null,
        lastError: message.slice(0, 500),
      }));
      this.logger.warn({ mailId: row.id, attempts: row.attempts, err: message }, giveUp ? 'mail not sent: gave up' : 'mail not sent: will retry');
      return false;
    }
  }

  /** A message that gave up goes back in the queue, as new. */
  async sendAgain(venueId: number, id: number): Promise<MailMessageRow | null> {
    const repo = this.db.getRepository(MailMessageRow);
    const result = await repo.update({ id, venueId, status: In(['failed', 'retry']) }, { status: 'queued', attempts: 0, nextAttemptAt: new Date(), lastError: null });
    if (!result.affected) return null;
    this.kick();
    return repo.findOneBy({ id });
  }

  /** The venue's outbox, newest first. */
  async outbox(venueId: number, limit = 100): Promise<MailView[]> {
    const rows = await this.db.getRepository(MailMessageRow).find({ where: { venueId }, order: { id: 'DESC' }, take: limit });
    if (rows.length === 0) return [];
    const files: { message_id: number; filename: string }[] = await this.db.query(
      `SELECT message_id, filename FROM mail_attachment WHERE message_id IN (${rows.map(() => '?').join(',')}) ORDER BY id`,
      rows.map((r) => r.id),
    );
    return rows.map((r) => toMailView(r, files.filter((f) => f.message_id === r.id).map((f) => f.filename)));
  }

  /**
   * The newest message of a kind about each of these people (the people page shows invitation
   * status), sent from this venue only: another venue's mail to the same person is not shown here.
   */
  async latestFor(personIds: number[], kind: MailKind, venueId: number): Promise<Map<number, MailView>> {
    const out = new Map<number, MailView>();
    if (personIds.length === 0) return out;
    const rows = await this.db.getRepository(MailMessageRow).find({ where: { personId: In(personIds), kind, venueId }, order: { id: 'ASC' } });
    for (const r of rows) out.set(r.personId!, toMailView(r));
    return out;
  }
}
