import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import type { MailView } from '@shared/protocol/mail';
import type { PersonRow } from '@shared/protocol/people';
import { MailQueue } from '../../server/features/mail/mail-queue';
import { createLogger } from '../../server/logger';
import { isDeadlock, retryOnDeadlock } from '../../server/db/retry';
import { Phone, openDrapeUnload } from '../support/crew';
import { signedIn, type Agent } from '../support/people';
import { startMailTestApp, tokenIn, waitForMail } from '../support/mail';

type MailApp = Awaited<ReturnType<typeof startMailTestApp>>;

async function waitFor<T>(read: () => Promise<T>, ok: (value: T) => boolean, timeoutMs = 8000): Promise<T> {
  const start = Date.now();
  for (;;) {
    const value = await read();
    if (ok(value)) return value;
    if (Date.now() - start > timeoutMs) throw new Error(`still not as expected: ${JSON.stringify(value)}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('mail', () => {
  let m: MailApp;
  let admin: Agent;
  let n = 0;
  const newEmail = () => `hand${++n}-${Date.now()}@larkspur.example`;
  beforeAll(async () => {
    m = await startMailTestApp();
    admin = await signedIn(m.t.url, 'td@larkspur.example');
  });
  afterAll(async () => { await m.close(); });

  const outboxFor = async (to: string): Promise<MailView[]> =>
    ((await admin.get('/api/mail/outbox')).body.messages as MailView[]).filter((x) => x.to === to);

  describe('invitations', () => {
    it('mails an invitation whose link works once, and not twice', async () => {
      const email = newEmail();
      const added = await admin.post('/api/people').send({ name: 'Ren Halyard', email, roles: ['loader'] });
      expect(added.status).toBe(201);
      expect(added.body.mail).toMatchObject({ kind: 'invitation', to: email, status: 'queued' });

      const mail = await waitForMail(m.mailbox, (x) => x.to.includes(email));
      expect(mail.subject).toBe('Your Railcall invitation to Larkspur Playhouse');
      expect(mail.text).toContain('Morgan Vale has added you');
      const token = tokenIn(mail.text, 'welcome');
      // The mailed link is the one the technical director was shown.
      expect(added.body.inviteUrl).toBe(`/welcome/${token}`);
      expect((await outboxFor(email))[0].status).toBe('sent');

      const first = await request(m.t.url).post('/api/auth/accept-invite').send({ token, password: 'arbor pipe locked' });
      expect(first.status).toBe(200);
      expect(first.body.name).toBe('Ren Halyard');
      const second = await request(m.t.url).post('/api/auth/accept-invite').send({ token, password: 'another password' });
      expect(second.status).toBe(404);
      expect((await request(m.t.url).post('/api/auth/sign-in').send({ email, password: 'arbor pipe locked' })).status).toBe(200);
    });

    it('refuses an invitation link after it expires', async () => {
      const email = newEmail();
      await admin.post('/api/people').send({ name: 'Lee Tarrant', email, roles: ['deck'] });
      const token = tokenIn((await waitForMail(m.mailbox, (x) => x.to.includes(email))).text, 'welcome');
      await m.t.database.owner.query('UPDATE person SET invite_expires_at = ? WHERE email = ?', [new Date(Date.now() - 1000), email]);
      const res = await request(m.t.url).post('/api/auth/accept-invite').send({ token, password: 'arbor pipe locked' });
      expect(res.status).toBe(404);
      expect(res.body.error.message).toMatch(/expired/);
      const person = ((await admin.get('/api/people')).body.people as PersonRow[]).find((p) => p.email === email)!;
      expect(person.status).toBe('invitation-expired');
    });

    it('sends a new invitation (the old link stops working) and takes one back', async () => {
      const email = newEmail();
      const added = await admin.post('/api/people').send({ name: 'Ash Purchase', email, roles: ['deck'] });
      const oldToken = tokenIn((await waitForMail(m.mailbox, (x) => x.to.includes(email))).text, 'welcome');
      const again = await admin.post(`/api/people/${added.body.person.id}/invitation`);
      expect(again.status).toBe(200);
      const newToken = again.body.inviteUrl.replace('/welcome/', '');
      const mails = await waitFor(() => m.mailbox.list(), (list) => list.filter((x) => x.to.includes(email)).length === 2);
      expect(mails.filter((x) => x.to.includes(email)).map((x) => tokenIn(x.text, 'welcome'))).toContain(newToken);
      expect((await request(m.t.url).post('/api/auth/accept-invite').send({ token: oldToken, password: 'arbor pipe locked' })).status).toBe(404);

      const revoked = await admin.delete(`/api/people/${added.body.person.id}/invitation`);
      expect(revoked.status).toBe(200);
      expect(revoked.body.person.status).toBe('invitation-revoked');
      expect((await request(m.t.url).post('/api/auth/accept-invite').send({ token: newToken, password: 'arbor pipe locked' })).status).toBe(404);
    });

    it('has no invitation to send to someone who has signed up', async () => {
      const [rail] = await m.t.database.owner.query("SELECT id FROM person WHERE email = 'rail@larkspur.example'");
      expect((await admin.post(`/api/people/${rail.id}/invitation`)).status).toBe(409);
      expect((await admin.delete(`/api/people/${rail.id}/invitation`)).status).toBe(409);
    });
  });

  describe('password reset', () => {
    it('mails a reset link that works once and ends the other sign-ins', async () => {
      const elsewhere = await signedIn(m.t.url, 'loader2@larkspur.example');
      const asked = await request(m.t.url).post('/api/auth/password-reset').send({ email: 'Loader2@larkspur.example' });
      expect(asked.status).toBe(202);
      const mail = await waitForMail(m.mailbox, (x) => x.to.includes('loader2@larkspur.example') && x.subject.includes('Reset'));
      const token = tokenIn(mail.text, 'reset-password');

      // Until the link is used the old password still works.
      expect((await request(m.t.url).post('/api/auth/sign-in').send({ email: 'loader2@larkspur.example', password: DEMO_PASSWORD })).status).toBe(200);
      const reset = await request(m.t.url).post('/api/auth/reset-password').send({ token, password: 'counterweight 2' });
      expect(reset.status).toBe(200);
      expect(reset.body.name).toBe('Alex Tamsin');
      expect((await request(m.t.url).post('/api/auth/reset-password').send({ token, password: 'counterweight 3' })).status).toBe(404);
      expect((await elsewhere.get('/api/me')).status).toBe(401);
      expect((await request(m.t.url).post('/api/auth/sign-in').send({ email: 'loader2@larkspur.example', password: DEMO_PASSWORD })).status).toBe(401);
      expect((await request(m.t.url).post('/api/auth/sign-in').send({ email: 'loader2@larkspur.example', password: 'counterweight 2' })).status).toBe(200);
    });

    it('refuses a reset link after it expires', async () => {
      await request(m.t.url).post('/api/auth/password-reset').send({ email: 'deck@larkspur.example' });
      const token = tokenIn((await waitForMail(m.mailbox, (x) => x.to.includes('deck@larkspur.example') && x.subject.includes('Reset'))).text, 'reset-password');
      await m.t.database.owner.query("UPDATE person SET reset_expires_at = ? WHERE email = 'deck@larkspur.example'", [new Date(Date.now() - 1000)]);
      expect((await request(m.t.url).post('/api/auth/reset-password').send({ token, password: 'counterweight 2' })).status).toBe(404);
    });

    it('answers an address without an account the same way, and mails nothing', async () => {
      const before = (await m.mailbox.list()).length;
      const res = await request(m.t.url).post('/api/auth/password-reset').send({ email: 'nobody-here@larkspur.example' });
      expect(res.status).toBe(202);
      const [row] = await m.t.database.owner.query("SELECT COUNT(*) AS n FROM mail_message WHERE to_address = 'nobody-here@larkspur.example'");
      expect(Number(row.n)).toBe(0);
      expect((await m.mailbox.list()).length).toBe(before);
    });
  });

  describe('with the mail server down', () => {
    it('queues, says it will retry, and sends once the mail server is back', async () => {
      await m.stopSmtp();
      try {
        const email = newEmail();
        const added = await admin.post('/api/people').send({ name: 'Mo Loftwell', email, roles: ['deck'] });
        expect(added.status).toBe(201);
        expect(added.body.mail.status).toBe('queued');
        const waiting = await waitFor(() => outboxFor(email), (list) => list[0]?.status === 'retry' && list[0].attempts >= 2);
        expect(waiting[0].lastError).toBeTruthy();
        expect(waiting[0].nextAttemptAt).not.toBeNull();
        const person = ((await admin.get('/api/people')).body.people as PersonRow[]).find((p) => p.email === email)!;
        expect(person.invitationMail?.status).toBe('retry');
        expect((await m.mailbox.list()).some((x) => x.to.includes(email))).toBe(false);

        await m.startSmtp();
        await waitForMail(m.mailbox, (x) => x.to.includes(email));
        const sent = await waitFor(() => outboxFor(email), (list) => list[0]?.status === 'sent');
        expect(sent).toHaveLength(1);
      } finally {
        await m.startSmtp().catch(() => undefined);
      }
    });

    it('never sends one message twice when two senders drain the queue at once', async () => {
      const a = new MailQueue(m.t.db, m.mailConfig, createLogger('silent'));
      const b = new MailQueue(m.t.db, m.mailConfig, createLogger('silent'));
      const subject = `Queue check ${Date.now()}`;
      await m.t.db.transaction(async (tx) => {
        for (let i = 0; i < 12; i++) {
          await a.enqueue(tx, { venueId: null, kind: 'session-report', to: { name: '', address: `q${i}@larkspur.example` }, subject, text: 'x' });
        }
      });
      // The app's own sender polls too: three senders at once.
      await Promise.all([a.drain(), b.drain()]);
      await Promise.all([a.stop(), b.stop()]);
      const sentCount = async () => Number((await m.t.database.owner.query("SELECT COUNT(*) AS n FROM mail_message WHERE subject = ? AND status = 'sent'", [subject]))[0].n);
      await waitFor(sentCount, (count) => count === 12);
      expect((await m.mailbox.list()).filter((x) => x.subject === subject)).toHaveLength(12);
    });

    it('runs a transaction again when the database picks it as a deadlock victim', async () => {
      const ids: number[] = [];
      await m.t.db.transaction(async (tx) => {
        for (const address of ['lock-a@larkspur.example', 'lock-b@larkspur.example']) {
          ids.push((await new MailQueue(m.t.db, m.mailConfig, createLogger('silent')).enqueue(tx, { venueId: null, kind: 'session-report', to: { name: '', address }, subject: 'lock', text: 'x' })).id);
        }
        // Out of every sender's reach, so only this test locks them.
        await tx.query("UPDATE mail_message SET status = 'failed' WHERE id IN (?, ?)", ids);
      });
      // Two transactions lock the same two rows in opposite order: InnoDB rolls one back (errno 1213).
      const crossing = () => {
        let arrived = 0;
        let release!: () => void;
        const bothHoldOne = new Promise<void>((resolve) => { release = resolve; });
        const run = (first: number, second: number, tries: number[]) => async () => {
          tries.push(1);
          await m.t.db.transaction(async (tx) => {
            await tx.query('SELECT id FROM mail_message WHERE id = ? FOR UPDATE', [first]);
            if (tries.length === 1 && ++arrived === 2) release();
            if (tries.length === 1) await bothHoldOne;
            await tx.query("UPDATE mail_message SET last_error = 'crossed' WHERE id = ?", [second]);
          });
        };
        return { run };
      };
      const bare = crossing();
      const bareResults = await Promise.allSettled([bare.run(ids[0], ids[1], [])(), bare.run(ids[1], ids[0], [])()]);
      const refused = bareResults.filter((r) => r.status === 'rejected');
      expect(refused).toHaveLength(1);
      expect(isDeadlock((refused[0] as PromiseRejectedResult).reason)).toBe(true);

      const retried = crossing();
      const triesA: number[] = [];
      const triesB: number[] = [];
      await Promise.all([retryOnDeadlock(retried.run(ids[0], ids[1], triesA)), retryOnDeadlock(retried.run(ids[1], ids[0], triesB))]);
      expect(triesA.length + triesB.length).toBe(3);
    });
  });

  describe('bad input', () => {
    it('answers a wrong e-mail address with a field error and writes nothing', async () => {
      const [before] = await m.t.database.owner.query('SELECT (SELECT COUNT(*) FROM person) AS people, (SELECT COUNT(*) FROM mail_message) AS mails');
      const add = await admin.post('/api/people').send({ name: 'Typo', email: 'not-an-address', roles: ['deck'] });
      expect(add.status).toBe(400);
      expect(add.body.error.fields.email).toEqual(['Enter an e-mail address']);
      const [deck] = await m.t.database.owner.query("SELECT id FROM person WHERE email = 'deck@larkspur.example'");
      const edit = await admin.put(`/api/people/${deck.id}`).send({ name: 'Robin Ashby', email: 'robin@' });
      expect(edit.status).toBe(400);
      expect(edit.body.error.fields.email).toBeDefined();
      expect((await request(m.t.url).post('/api/auth/password-reset').send({ email: 'x' })).body.error.fields.email).toBeDefined();
      const sm = await signedIn(m.t.url, 'sm@larkspur.example');
      const [session] = await m.t.database.owner.query('SELECT MIN(id) AS id FROM loading_session');
      const report = await sm.post(`/api/sessions/${session.id ?? 1}/report-mail`).send({ addresses: ['ok@larkspur.example', 'no at sign'] });
      expect(report.status).toBe(400);
      expect(report.body.error.fields['addresses.1']).toEqual(['Not an e-mail address']);
      const [after] = await m.t.database.owner.query('SELECT (SELECT COUNT(*) FROM person) AS people, (SELECT COUNT(*) FROM mail_message) AS mails');
      expect(after).toEqual(before);
      expect((await admin.get(`/api/people`)).body.people.find((p: PersonRow) => p.id === deck.id).email).toBe('deck@larkspur.example');
    });
  });

  describe('the session report', () => {
    it('is mailed by the stage manager to the people chosen, with the report attached', async () => {
      const rail = await Phone.signIn(m.t.url, 'rail@larkspur.example');
      const { sessionId } = await openDrapeUnload(m.t.url, rail.cookie);
      rail.close();
      const sm = await signedIn(m.t.url, 'sm@larkspur.example');
      const people = (await sm.get('/api/mail/recipients')).body.people as { id: number; email: string }[];
      const td = people.find((p) => p.email === 'td@larkspur.example')!;
      const res = await sm.post(`/api/sessions/${sessionId}/report-mail`).send({ personIds: [td.id], addresses: ['Producer@Larkspur.example'], note: 'For the usage log.' });
      expect(res.status).toBe(202);
      expect(res.body.messages.map((x: MailView) => x.to).sort()).toEqual(['producer@larkspur.example', 'td@larkspur.example']);
      for (const address of ['td@larkspur.example', 'producer@larkspur.example']) {
        const mail = await waitForMail(m.mailbox, (x) => x.to.includes(address) && x.subject.startsWith('Session report'));
        expect(mail.subject).toBe('Session report: Strike the sea-mist drapes (Larkspur Playhouse)');
        expect(mail.text).toContain('For the usage log.');
        expect(mail.attachments).toHaveLength(1);
        expect(mail.attachments[0]).toMatchObject({ contentType: 'application/pdf', filename: `railcall-session-${sessionId}-strike-the-sea-mist-drapes.pdf` });
        const file = await m.mailbox.attachment(mail.id, 0);
        // The same PDF the report screen downloads.
        const download = await sm.get(`/api/record/sessions/${sessionId}/report.pdf`);
        expect(file.content.subarray(0, 5).toString()).toBe('%PDF-');
        expect(file.content.length).toBeGreaterThan(1000);
        expect(Math.abs(file.content.length - download.body.length)).toBeLessThan(200);
      }
    });

    it('is refused for someone who is not at the venue, or a session of another venue', async () => {
      const sm = await signedIn(m.t.url, 'sm@larkspur.example');
      expect((await sm.post('/api/sessions/999999/report-mail').send({ addresses: ['a@larkspur.example'] })).status).toBe(404);
      const [row] = await m.t.database.owner.query('SELECT MAX(id) AS id FROM loading_session');
      const res = await sm.post(`/api/sessions/${row.id}/report-mail`).send({ personIds: [999999] });
      expect(res.status).toBe(400);
      expect(res.body.error.fields.personIds).toBeDefined();
      expect((await sm.post(`/api/sessions/${row.id}/report-mail`).send({})).body.error.fields.personIds).toEqual(['Choose at least one person or address']);
    });
  });
});
