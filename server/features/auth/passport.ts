import type { Request } from 'express';
import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import type { PeopleService, SignedInUser } from '../people/people.service';
import { verifyPassword } from './password';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // passport's req.user is the signed-in person as the server knows them.
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SignedInUser {}
  }
}

/** Why a sign-in was refused: "wrong" for an unknown e-mail or a wrong password alike; the others only after the password was right. */
export interface SignInRefusal {
  message: 'wrong' | 'deactivated' | 'no-role';
}

/** A passport instance of our own (not the global singleton), so each app in a test stands alone. */
export function createPassport(people: PeopleService): passport.PassportStatic {
  const instance = new passport.Passport() as unknown as passport.PassportStatic;
  instance.use(new LocalStrategy({ usernameField: 'email', passwordField: 'password' }, (email, password, done) => {
    (async () => {
      const person = await people.findByEmail(email);
      const ok = await verifyPassword(person?.passwordHash ?? null, password);
      if (!person || !ok) return done(null, false, { message: 'wrong' } satisfies SignInRefusal);
      // Only now, with the password right, may the answer say more than "wrong".
      if (person.deactivatedAt) return done(null, false, { message: 'deactivated' } satisfies SignInRefusal);
      const user = await people.loadUser(person.id);
      return done(null, user ?? false, user ? undefined : ({ message: 'no-role' } satisfies SignInRefusal));
    })().catch(done);
  }));
  instance.serializeUser((user, done) => done(null, (user as SignedInUser).id));
  instance.deserializeUser((req: Request, id: number, done: (error: unknown, user?: SignedInUser | false) => void) => {
    // A person whose roles were all removed is signed out on their next request; the venue they act on
    // is the one chosen in this sign-in while they still hold a role there (resolveVenue).
    people.loadUser(id, req.session?.venueId).then((user) => done(null, user ?? false), done);
  });
  return instance;
}
