import { z } from 'zod';

/** Roles are held per venue. */
export const ROLES = ['admin', 'rail', 'loader', 'deck', 'stage-manager'] as const;
export const roleSchema = z.enum(ROLES);
export type Role = z.infer<typeof roleSchema>;

/** Words shown on screen for each role. */
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Technical director',
  rail: 'Rail operator',
  loader: 'Loader',
  deck: 'Deck crew',
  'stage-manager': 'Stage manager',
};

/** The roles a person can take inside a live loading session. */
export const SESSION_ROLES = ['rail', 'loader', 'deck', 'stage-manager'] as const satisfies readonly Role[];
export type SessionRole = (typeof SESSION_ROLES)[number];
export const sessionRoleSchema = z.enum(SESSION_ROLES);
