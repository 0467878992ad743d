import { ROLE_LABELS, ROLES, type Role } from '@shared/protocol/roles';

/** The home screen of each role. */
export const ROLE_HOMES: Record<Role, string> = {
  admin: '/admin/people',
  rail: '/rail',
  loader: '/bridge',
  deck: '/deck',
  'stage-manager': '/watch',
};

/** Where a signed-in person without any role lands. */
export const NO_ROLE_HOME = '/no-role';
export const SIGN_IN_PATH = '/sign-in';

/** The roles a person holds, in the fixed order admin, rail, loader, deck, stage manager. */
export function orderedRoles(roles: readonly Role[]): Role[] {
  return ROLES.filter((role) => roles.includes(role));
}

/** A person's home: the first of admin, rail, loader, deck, stage manager they hold. */
export function homeFor(roles: readonly Role[]): string {
  const first = orderedRoles(roles)[0];
  return first ? ROLE_HOMES[first] : NO_ROLE_HOME;
}

/** Every role home a person can switch to, first one being their landing home. */
export function roleHomesFor(roles: readonly Role[]): { role: Role; label: string; path: string }[] {
  return orderedRoles(roles).map((role) => ({ role, label: ROLE_LABELS[role], path: ROLE_HOMES[role] }));
}

/**
 * A `next` query value that is safe to navigate to after sign-in: an in-app path only,
 * never another site (`//host`, `https:`) and never back to the sign-in page.
 */
export function safeNext(next: unknown): string | null {
  const value = Array.isArray(next) ? next[0] : next;
  if (typeof value !== 'string' || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) {
    return null;
  }
  if (value === SIGN_IN_PATH || value.startsWith(`${SIGN_IN_PATH}?`)) return null;
  return value;
}

/** How a route says who may open it (kept in route meta). */
export interface AccessMeta {
  /** Anyone, signed in or not. */
  public?: boolean;
  /** Only people who are not signed in (the sign-in page). */
  guestOnly?: boolean;
  /** Sends the signed-in person to their home. */
  landing?: boolean;
  /** Holding any one of these is enough; absent means any signed-in person. */
  roles?: readonly Role[];
}

export type AccessDecision =
  | { allow: true }
  | { allow: false; redirect: string | { path: string; query: Record<string, string> }; notice?: string };

/**
 * The route guard's decision, apart from the router so it can be tested alone.
 * `roles` is null when nobody is signed in.
 */
export function decideAccess(to: { fullPath: string; meta: AccessMeta }, roles: readonly Role[] | null): AccessDecision {
  const { meta } = to;
  if (meta.public) return { allow: true };
  if (meta.guestOnly) return roles ? { allow: false, redirect: homeFor(roles) } : { allow: true };
  if (!roles) {
    const next = safeNext(to.fullPath);
    return {
      allow: false,
      redirect: next && next !== '/' ? { path: SIGN_IN_PATH, query: { next } } : SIGN_IN_PATH,
    };
  }
  if (meta.landing) return { allow: false, redirect: homeFor(roles) };
  if (meta.roles && meta.roles.length > 0 && !meta.roles.some((role) => roles.includes(role))) {
    const needed = meta.roles.map((role) => ROLE_LABELS[role].toLowerCase()).join(' or ');
    return {
      allow: false,
      redirect: homeFor(roles),
      notice: `That screen is for the ${needed}. Here is your own home screen.`,
    };
  }
  return { allow: true };
}
