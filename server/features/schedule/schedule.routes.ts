import { route, type RouteSpec } from '../../middleware/routes';
import type { ScheduleService } from './schedule.service';

/** Everyone at the venue reads the schedule: the crew needs the weights as much as the lead. */
export function scheduleRoutes(schedule: ScheduleService): RouteSpec[] {
  return [
    route({
      method: 'get',
      path: '/venue',
      access: { roles: 'any' },
      handler: async ({ user }) => ({ venue: await schedule.venue(user.venueId) }),
    }),
    route({
      method: 'get',
      path: '/schedule',
      access: { roles: 'any' },
      handler: ({ user }) => schedule.schedule(user.venueId),
    }),
  ];
}
