import { addPersonSchema, setRolesSchema } from '@shared/protocol/people';
import { route, type RouteSpec } from '../../middleware/routes';
import { idParam } from '../../middleware/validate';
import type { PeopleService } from './people.service';

const ADMIN = { roles: ['admin'] } as const;

/** `onRolesChanged` lets live parts (sockets watching sessions) drop what the person may no longer see. */
export function peopleRoutes(people: PeopleService, onRolesChanged: (personId: number) => void = () => {}): RouteSpec[] {
  return [
    route({
      method: 'get',
      path: '/people',
      access: ADMIN,
      handler: async ({ user }) => ({ people: await people.list(user.venueId) }),
    }),
    route({
      method: 'post',
      path: '/people',
      access: ADMIN,
      status: 201,
      body: addPersonSchema,
      async handler({ user, body }) {
        const { person, token } = await people.add(user.venueId, body);
        return { person, inviteUrl: `/welcome/${token}` };
      },
    }),
    route({
      method: 'put',
      path: '/people/:id/roles',
      access: ADMIN,
      params: idParam,
      body: setRolesSchema,
      async handler({ user, params, body }) {
        const person = await people.setRoles(user.venueId, params.id, body.roles);
        onRolesChanged(person.id);
        return { person };
      },
    }),
  ];
}
