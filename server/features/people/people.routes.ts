import { addPersonSchema, editPersonSchema, setRolesSchema, type AddPersonResult } from '@shared/protocol/people';
import { route, type RouteSpec } from '../../middleware/routes';
import { idParam } from '../../middleware/validate';
import { invitePath, type PeopleService } from './people.service';

const ADMIN = { roles: ['admin'] } as const;

export interface PeopleRouteHooks {
  /** Lets live parts (sockets watching sessions) drop what the person may no longer see. */
  onRolesChanged(personId: number): void;
  /** Closes every socket of a deactivated person (their stored sign-ins are already deleted). */
  onDeactivated(personId: number): void;
}

export function peopleRoutes(people: PeopleService, hooks: PeopleRouteHooks): RouteSpec[] {
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
        const { person, token, mail, joinedExisting } = await people.add(user.venueId, user, body);
        return { person, inviteUrl: token ? invitePath(token) : null, mail, joinedExisting } satisfies AddPersonResult;
      },
    }),
    route({
      method: 'put',
      path: '/people/:id',
      access: ADMIN,
      params: idParam,
      body: editPersonSchema,
      handler: async ({ user, params, body }) => ({ person: await people.edit(user.venueId, params.id, body) }),
    }),
    route({
      method: 'put',
      path: '/people/:id/roles',
      access: ADMIN,
      params: idParam,
      body: setRolesSchema,
      async handler({ user, params, body }) {
        const person = await people.setRoles(user.venueId, params.id, body.roles);
        hooks.onRolesChanged(person.id);
        return { person };
      },
    }),
    route({
      method: 'post',
      path: '/people/:id/invitation',
      access: ADMIN,
      params: idParam,
      async handler({ user, params }) {
        const { person, token, mail } = await people.resendInvitation(user.venueId, user, params.id);
        return { person, inviteUrl: invitePath(token), mail, joinedExisting: false } satisfies AddPersonResult;
      },
    }),
    route({
      method: 'delete',
      path: '/people/:id/invitation',
      access: ADMIN,
      params: idParam,
      handler: async ({ user, params }) => ({ person: await people.revokeInvitation(user.venueId, params.id) }),
    }),
    route({
      method: 'post',
      path: '/people/:id/deactivate',
      access: ADMIN,
      params: idParam,
      async handler({ user, params }) {
        const person = await people.deactivate(user.venueId, user, params.id);
        hooks.onDeactivated(person.id);
        return { person };
      },
    }),
    route({
      method: 'post',
      path: '/people/:id/reactivate',
      access: ADMIN,
      params: idParam,
      handler: async ({ user, params }) => ({ person: await people.reactivate(user.venueId, params.id) }),
    }),
  ];
}
