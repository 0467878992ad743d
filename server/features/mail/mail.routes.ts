import { z } from 'zod';
import { reportMailSchema } from '@shared/protocol/mail';
import { route, type RouteSpec } from '../../middleware/routes';
import { idParam } from '../../middleware/validate';
import { HttpError, notFound } from '../../middleware/http-error';
import type { PeopleService } from '../people/people.service';
import type { MailQueue } from './mail-queue';
import type { Mailbox } from './mailbox';
import type { ReportMailer } from './report-mail';

const ADMIN = { roles: ['admin'] } as const;
/** The lead (rail operator) and the stage manager send the session report; the technical director may too. */
const REPORT_SENDERS = { roles: ['rail', 'stage-manager', 'admin'] } as const;

export interface MailRouteDeps {
  queue: MailQueue;
  people: PeopleService;
  reports: ReportMailer;
  /** The local fake mail server's messages; null in production (its routes do not exist there). */
  mailbox: Mailbox | null;
}

export function mailRoutes({ queue, people, reports, mailbox }: MailRouteDeps): RouteSpec[] {
  const routes: RouteSpec[] = [
    route({
      method: 'get',
      path: '/mail/outbox',
      access: ADMIN,
      handler: async ({ user }) => ({ messages: await queue.outbox(user.venueId) }),
    }),
    route({
      method: 'post',
      path: '/mail/:id/send-again',
      access: ADMIN,
      params: idParam,
      async handler({ user, params }) {
        const row = await queue.sendAgain(user.venueId, params.id);
        if (!row) throw new HttpError('not-found', 'No message of this venue is waiting to be sent again under that number.');
        return { messages: await queue.outbox(user.venueId) };
      },
    }),
    route({
      method: 'get',
      path: '/mail/recipients',
      access: REPORT_SENDERS,
      handler: async ({ user }) => ({ people: await people.recipients(user.venueId) }),
    }),
    route({
      method: 'post',
      path: '/sessions/:id/report-mail',
      access: REPORT_SENDERS,
      status: 202,
      params: idParam,
      body: reportMailSchema,
      handler: async ({ user, params, body }) => ({ messages: await reports.send(user, params.id, body) }),
    }),
  ];
  if (mailbox) {
    routes.push(
      route({
        method: 'get',
        path: '/dev/mailbox',
        access: ADMIN,
        handler: async () => ({ messages: await mailbox.list() }),
      }),
      route({
        method: 'get',
        path: '/dev/mailbox/:id/attachments/:index',
        access: ADMIN,
        params: z.object({ id: z.string().max(40), index: z.coerce.number().int().min(0).max(100) }),
        async handler({ params, res }) {
          const file = await mailbox.attachment(params.id, params.index).catch(() => { throw notFound('That attachment'); });
          res.attachment(file.filename).type(file.contentType).send(file.content);
          return undefined;
        },
      }),
    );
  }
  return routes;
}
