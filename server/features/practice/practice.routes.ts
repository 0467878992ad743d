import { finishPracticeSchema, startPracticeSchema, trainingQuerySchema } from '@shared/protocol/practice';
import { route, type RouteSpec } from '../../middleware/routes';
import { idParam } from '../../middleware/validate';
import type { PracticeService } from './practice.service';

/** Anyone at the venue practises; the technical director also reads everyone's (the training record). */
export function practiceRoutes(practice: PracticeService): RouteSpec[] {
  return [
    route({
      method: 'post',
      path: '/practice-runs',
      access: { roles: 'any' },
      status: 201,
      body: startPracticeSchema,
      handler: ({ user, body }) => practice.start(user, body),
    }),
    route({
      method: 'put',
      path: '/practice-runs/:id/result',
      access: { roles: 'any' },
      params: idParam,
      body: finishPracticeSchema,
      handler: ({ user, params, body }) => practice.finish(user, params.id, body),
    }),
    route({
      method: 'get',
      path: '/practice-runs',
      access: { roles: 'any' },
      query: trainingQuerySchema,
      handler: async ({ user, query }) => ({ practices: await practice.list(user, query) }),
    }),
    route({
      method: 'get',
      path: '/practice-runs/:id',
      access: { roles: 'any' },
      params: idParam,
      handler: ({ user, params }) => practice.get(user, params.id),
    }),
  ];
}
