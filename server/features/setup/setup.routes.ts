import { rateLimit } from 'express-rate-limit';
import { firstRunSchema, type SetupStatus } from '@shared/protocol/people';
import { HttpError } from '../../middleware/http-error';
import { route, type RouteSpec } from '../../middleware/routes';
import { logIn } from '../auth/auth.routes';
import type { PeopleService } from '../people/people.service';
import type { FirstRun } from './setup.service';

/** Wrong setup codes per address and window: the code cannot be guessed from the network. */
const setupThrottle = () => rateLimit({
  windowMs: 15 * 60 * 1000,
  limit: 10,
  skipSuccessfulRequests: true,
  standardHeaders: 'draft-8',
  legacyHeaders: false,
  handler: (_req, res) => {
    res.status(429).json(new HttpError('too-many-requests', 'Too many wrong setup codes from this device. Wait 15 minutes and try again.').toBody());
  },
});

export function setupRoutes(firstRun: FirstRun, people: PeopleService): RouteSpec[] {
  return [
    route({
      method: 'get',
      path: '/setup',
      access: { public: true },
      handler: async (): Promise<SetupStatus> => ({ needed: await firstRun.needed() }),
    }),
    route({
      method: 'post',
      path: '/setup',
      access: { public: true },
      status: 201,
      before: [setupThrottle()],
      body: firstRunSchema,
      async handler({ req, body }) {
        const personId = await firstRun.complete(body);
        const user = await people.loadUser(personId);
        if (!user) throw new HttpError('internal', 'The venue was created but its director could not be signed in. Sign in by hand.');
        await logIn(req, user);
        return people.me(user);
      },
    }),
  ];
}
