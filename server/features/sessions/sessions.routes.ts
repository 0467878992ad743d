import { z } from 'zod';
import { actionEnvelopeSchema } from '@shared/protocol/session';
import { createSessionSchema, eventsQuerySchema, listSessionsQuerySchema } from '@shared/protocol/sessions-api';
import type { ErrorCode } from '@shared/protocol/ack';
import { HttpError } from '../../middleware/http-error';
import { route, type RouteSpec } from '../../middleware/routes';
import { idParam } from '../../middleware/validate';
import type { SessionsService } from './sessions.service';
import type { Presence } from './presence';
import { verifyChain } from './hash-chain';

const EVERYONE = { roles: 'any' } as const;

export function sessionRoutes(sessions: SessionsService, presence: Presence): RouteSpec[] {
  return [
    route({
      method: 'post',
      path: '/sessions',
      access: { roles: ['rail', 'admin'] },
      status: 201,
      body: createSessionSchema,
      handler: ({ user, body }) => sessions.create(user, body),
    }),
    route({
      method: 'get',
      path: '/sessions',
      access: EVERYONE,
      query: listSessionsQuerySchema,
      handler: async ({ user, query }) => ({ sessions: await sessions.list(user, query.active === '1') }),
    }),
    route({
      method: 'get',
      path: '/sessions/:id',
      access: EVERYONE,
      params: idParam,
      async handler({ user, params }) {
        const found = await sessions.get(user, params.id);
        return { ...found, presence: await presence.list(params.id, found.state) };
      },
    }),
    route({
      method: 'post',
      path: '/sessions/:id/actions',
      access: EVERYONE,
      params: idParam,
      body: actionEnvelopeSchema,
      async handler({ user, params, body, res }) {
        // The same decision path as the socket's session:act.
        const { answer } = await sessions.act(user, params.id, body);
        if (answer.ok) return answer;
        // The refusal is in the log: its seq goes along, as in the socket's acknowledgement.
        const refused = new HttpError(answer.error.code as ErrorCode, answer.error.message);
        res.status(refused.status).json({ ...refused.toBody(), seq: answer.seq });
        return undefined;
      },
    }),
    route({
      method: 'get',
      path: '/sessions/:id/events',
      access: EVERYONE,
      params: idParam,
      query: eventsQuerySchema,
      // Paged: at most `limit` (<= 500) entries; `more` and `nextAfter` lead to the next page.
      handler: ({ user, params, query }) => sessions.events(user, params.id, query.after, query.limit),
    }),
    route({
      method: 'get',
      path: '/sessions/:id/record',
      access: EVERYONE,
      params: idParam,
      query: z.object({}),
      async handler({ user, params }) {
        // The kept record for export. The check here is a convenience; a reader repeats it with the same
        // rule: hash = sha-256 of entryHashText(entry) (keys sorted), the first prevHash = genesisHash.
        const record = await sessions.record(user, params.id);
        return { ...record, chain: verifyChain(record.entries, record.genesisHash, record) };
      },
    }),
  ];
}
