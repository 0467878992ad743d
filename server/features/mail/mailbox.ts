import { readdir, readFile } from 'node:fs/promises';
import { join } from 'node:path';
import { simpleParser, type AddressObject, type ParsedMail } from 'mailparser';
import type { MailboxMessage } from '@shared/protocol/mail';
import { notFound } from '../../middleware/http-error';

const ID = /^[0-9]{15}-[0-9a-f]{8}$/;

const addressText = (a: AddressObject | AddressObject[] | undefined) =>
  (Array.isArray(a) ? a.map((x) => x.text).join(', ') : a?.text) ?? '';

function toMessage(id: string, mail: ParsedMail): MailboxMessage {
  return {
    id,
    from: addressText(mail.from),
    to: addressText(mail.to),
    subject: mail.subject ?? '',
    date: mail.date?.toISOString() ?? null,
    text: mail.text ?? '',
    attachments: mail.attachments.map((a, index) => ({ index, filename: a.filename ?? `attachment-${index + 1}`, contentType: a.contentType, size: a.size })),
  };
}

/** Reads what the local fake mail server kept (development and tests only). */
export class Mailbox {
  constructor(private readonly dir: string) {}

  private async parse(id: string): Promise<ParsedMail> {
    if (!ID.test(id)) throw notFound('That message');
    const raw = await readFile(join(this.dir, `${id}.eml`)).catch(() => null);
    if (!raw) throw notFound('That message');
    return simpleParser(raw);
  }

  /** Newest first. */
  async list(limit = 200): Promise<MailboxMessage[]> {
    const names = await readdir(this.dir).catch(() => [] as string[]);
    const ids = names.filter((n) => n.endsWith('.eml')).map((n) => n.slice(0, -4)).filter((id) => ID.test(id)).sort().reverse().slice(0, limit);
    return Promise.all(ids.map(async (id) => toMessage(id, await this.parse(id))));
  }

  async get(id: string): Promise<MailboxMessage> {
    return toMessage(id, await this.parse(id));
  }

  async attachment(id: string, index: number): Promise<{ filename: string; contentType: string; content: Buffer }> {
    const a = (await this.parse(id)).attachments[index];
    if (!a) throw notFound('That attachment');
    return { filename: a.filename ?? `attachment-${index + 1}`, contentType: a.contentType, content: a.content };
  }
}
