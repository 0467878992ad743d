import type { Request } from 'express';
import type { PassportStatic } from 'passport';
import { acceptInviteSchema, chooseVenueSchema, newVenueSchema, passwordResetRequestSchema, resetPasswordSchema, signInSchema, type Me } from '@shared/protocol/people';
import { HttpError } from '../../middleware/http-error';
import { SESSION_COOKIE } from '../../middleware/session';
import { route, type RouteSpec } from '../../middleware/routes';
import type { PeopleService, SignedInUser } from '../people/people.service';
import type { SignInRefusal } from './passport';
import type { VenueCreator } from '../venue/venue-creator';
import type { RequestHandler } from 'express';

export interface AuthRouteDeps {
  people: PeopleService;
  venues: VenueCreator;
  passport: PassportStatic;
  throttles: RequestHandler[];
  resetThrottles: RequestHandler[];
  /** Called after a sign-out with the ended session's id, to disconnect its sockets. */
  onSignedOut(sessionId: string): void;
  /** Called after a sign-in switched venue, to tell its other tabs. */
  onVenueChosen(sessionId: string, me: Me): void;
  /** Called after a password reset, which ends every other sign-in of the person. */
  onSignedOutEverywhere(personId: number): void;
}

/** passport 0.7 regenerates the session id inside logIn: a stolen pre-sign-in cookie is worth nothing. */
export function logIn(req: Request, user: SignedInUser): Promise<void> {
  return new Promise((resolve, reject) => {
    req.logIn(user, (error) => {
      if (error) return reject(error);
      req.session.signedInAt = Date.now();
      resolve();
    });
  });
}

function authenticate(passport: PassportStatic, req: Request): Promise<SignedInUser | SignInRefusal> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', { session: false }, (error: unknown, user: SignedInUser | false, info?: SignInRefusal) => {
      if (error) reject(error);
      else resolve(user || (info?.message ? info : { message: 'wrong' }));
    })(req, req.res, reject);
  });
}

/** What a refused sign-in is told. An unknown e-mail and a wrong password read the same. */
function refusal(why: SignInRefusal['message']): HttpError {
  if (why === 'no-role') {
    return new HttpError('forbidden', 'Your password is right, but you hold no role at this venue any more. Ask your technical director to give you one.');
  }
  if (why === 'deactivated') return new HttpError('forbidden', 'Your password is right, but this account has been deactivated. Ask your technical director.');
  return new HttpError('unauthenticated', 'E-mail or password is wrong.');
}

export function authRoutes(deps: AuthRouteDeps): RouteSpec[] {
  return [
    route({
      method: 'post',
      path: '/auth/sign-in',
      access: { public: true },
      before: deps.throttles,
      body: signInSchema,
      async handler({ req, body }) {
        req.body = body;
        const user = await authenticate(deps.passport, req);
        if ('message' in user) throw refusal(user.message);
        await logIn(req, user);
        return deps.people.me(user);
      },
    }),
    route({
      method: 'post',
      path: '/auth/sign-out',
      access: { public: true },
      async handler({ req, res }) {
        const sessionId = req.sessionID;
        await new Promise<void>((resolve, reject) => req.logOut((e) => (e ? reject(e) : resolve())));
        await new Promise<void>((resolve, reject) => req.session.destroy((e) => (e ? reject(e) : resolve())));
        deps.onSignedOut(sessionId);
        res.clearCookie(SESSION_COOKIE);
        res.status(204).end();
      },
    }),
    route({
      method: 'post',
      path: '/auth/accept-invite',
      access: { public: true },
      before: deps.throttles.slice(0, 1),
      body: acceptInviteSchema,
      async handler({ req, body }) {
        const personId = await deps.people.acceptInvite(body.token, body.password);
        const user = await deps.people.loadUser(personId);
        if (!user) throw new HttpError('forbidden', 'Your account holds no role at any venue yet. Ask your technical director.');
        await logIn(req, user);
        return deps.people.me(user);
      },
    }),
    route({
      method: 'post',
      path: '/auth/password-reset',
      access: { public: true },
      status: 202,
      before: deps.resetThrottles,
      body: passwordResetRequestSchema,
      async handler({ body }) {
        await deps.people.requestPasswordReset(body.email);
        // The same answer for every address: nobody learns here who has an account.
        return { message: 'If that address belongs to an account, a link to reset the password is on its way. It works once, for an hour.' };
      },
    }),
    route({
      method: 'post',
      path: '/auth/reset-password',
      access: { public: true },
      before: deps.throttles.slice(0, 1),
      body: resetPasswordSchema,
      async handler({ req, body }) {
        const personId = await deps.people.resetPassword(body.token, body.password);
        deps.onSignedOutEverywhere(personId);
        const user = await deps.people.loadUser(personId);
        if (!user) throw new HttpError('forbidden', 'Your account holds no role at any venue yet. Ask your technical director.');
        await logIn(req, user);
        return deps.people.me(user);
      },
    }),
    route({
      method: 'get',
      path: '/me',
      access: { roles: 'any' },
      handler: ({ user }) => deps.people.me(user),
    }),
    route({
      method: 'put',
      path: '/me/venue',
      access: { roles: 'any' },
      body: chooseVenueSchema,
      handler: ({ req, user, body }) => actOnVenue(req, user.id, body.venueId),
    }),
    route({
      method: 'post',
      path: '/venues',
      // A technical director opens another venue (a company's second theatre) and acts on it at once.
      access: { roles: ['admin'] },
      status: 201,
      body: newVenueSchema,
      async handler({ req, user, body }) {
        const venueId = await deps.venues.create(user, body);
        return actOnVenue(req, user.id, venueId);
      },
    }),
  ];

  /** Keeps the chosen venue in the sign-in, checked against the roles the person holds now. */
  async function actOnVenue(req: Request, personId: number, venueId: number): Promise<Me> {
    const chosen = await deps.people.loadUser(personId, venueId);
    if (!chosen || chosen.venueId !== venueId) {
      throw new HttpError('not-found', 'You hold no role at that venue.', { venueId: ['You hold no role at that venue'] });
    }
    req.session.venueId = chosen.venueId;
    await new Promise<void>((resolve, reject) => req.session.save((e) => (e ? reject(e) : resolve())));
    req.user = chosen;
    const me = await deps.people.me(chosen);
    deps.onVenueChosen(req.sessionID, me);
    return me;
  }
}
