import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { MailboxMessage } from '@shared/protocol/mail';
import type { Config } from '../../server/config';
import { startFakeSmtp, type FakeSmtp } from '../../server/features/mail/fake-smtp';
import { Mailbox } from '../../server/features/mail/mailbox';
import { startTestApp, type TestApp } from './app';

export const TEST_PUBLIC_URL = 'http://railcall.test';

/** The test app wired to a local fake mail server of its own, with a quick poll and short back-offs. */
export async function startMailTestApp(opts: { config?: (c: Config) => Config } = {}) {
  const dir = mkdtempSync(join(tmpdir(), 'railcall-mail-'));
  let smtp: FakeSmtp = await startFakeSmtp({ dir });
  const port = smtp.port;
  let mailConfig!: Config['mail'];
  const t: TestApp = await startTestApp({
    config: (c) => {
      const withMail: Config = {
        ...c,
        mail: {
          ...c.mail,
          smtp: { host: '127.0.0.1', port, secure: false },
          publicUrl: TEST_PUBLIC_URL,
          mailboxDir: dir,
          pollMs: 100,
          retryBaseMs: 200,
          retryMaxMs: 1000,
        },
      };
      const final = opts.config ? opts.config(withMail) : withMail;
      mailConfig = final.mail;
      return final;
    },
  });
  const mailbox = new Mailbox(dir);
  return {
    t,
    mailbox,
    dir,
    mailConfig,
    /** Stops the fake mail server (as a mail server that is down). */
    stopSmtp: () => smtp.close(),
    /** Starts it again on the same port. */
    async startSmtp() { smtp = await startFakeSmtp({ dir, port }); },
    async close() {
      await t.close();
      await smtp.close().catch(() => undefined);
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Waits until the fake mail server holds a message that matches. */
export async function waitForMail(mailbox: Mailbox, match: (m: MailboxMessage) => boolean, timeoutMs = 8000): Promise<MailboxMessage> {
  const start = Date.now();
  for (;;) {
    const found = (await mailbox.list()).find(match);
    if (found) return found;
    if (Date.now() - start > timeoutMs) throw new Error('no such message arrived at the fake mail server');
    await new Promise((r) => setTimeout(r, 50));
  }
}

/** The token of the first Railcall link of a path kind (`welcome`, `reset-password`) in a message. */
export function tokenIn(text: string, kind: 'welcome' | 'reset-password'): string {
  const match = new RegExp(`${TEST_PUBLIC_URL.replace(/[.]/g, '\\.')}/${kind}/([A-Za-z0-9_-]+)`).exec(text);
  if (!match) throw new Error(`no ${kind} link in: ${text}`);
  return match[1];
}
