import { z } from 'zod';
import { roleSchema, type Role } from './roles';
import type { MailView } from './mail';

export const UNIT_SYSTEMS = ['imperial', 'metric'] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

export const signInSchema = z.object({
  email: z.email('Enter an e-mail address').max(254),
  password: z.string().min(1, 'Enter your password').max(200),
});
export type SignInInput = z.infer<typeof signInSchema>;

export const passwordSchema = z.string().min(10, 'Use at least 10 characters').max(200);

export const addPersonSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(120),
  email: z.email('Enter an e-mail address').max(254),
  roles: z.array(roleSchema).min(1, 'Give at least one role').max(5),
});
export type AddPersonInput = z.infer<typeof addPersonSchema>;

export const setRolesSchema = z.object({
  roles: z.array(roleSchema).max(5),
});

/**
 * The token in an invitation or reset link: 32 random bytes in base64url, 43 characters. A link cut
 * short or garbled (a mail program wrapped it, a character was lost in copying) fails here, before
 * the server looks anything up.
 */
export const LINK_TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/;
export const linkTokenSchema = z.string().trim().regex(LINK_TOKEN_PATTERN, 'This link is cut short or garbled');

export const acceptInviteSchema = z.object({
  token: linkTokenSchema,
  password: passwordSchema,
});

export interface VenueSummary {
  id: number;
  name: string;
  units: UnitSystem;
  /** IANA name: every date and time on screen is shown in it. */
  timeZone: string;
}

/** What `GET /api/me` answers for a signed-in person. */
export interface Me {
  id: number;
  name: string;
  email: string;
  /** The venue the person acts on now (every route and socket event works on this one). */
  venue: VenueSummary;
  /** Their roles at that venue. */
  roles: Role[];
  /** Every venue they hold a role at, to switch between (the menu). */
  venues: (VenueSummary & { roles: Role[] })[];
}

/** `PUT /api/me/venue`: act on another venue where the person holds a role. */
export const chooseVenueSchema = z.object({
  venueId: z.coerce.number().int().positive('Choose a venue'),
});
export type ChooseVenueInput = z.infer<typeof chooseVenueSchema>;

/** `POST /api/venues`: a technical director opens another venue (a second theatre); they become its technical director. */
export const newVenueSchema = z.object({
  name: z.string().trim().min(1, 'Enter the venue name').max(120),
  units: z.enum(UNIT_SYSTEMS, 'Choose imperial or metric'),
});
export type NewVenueInput = z.infer<typeof newVenueSchema>;

/** Changing a person's name and e-mail address (crew administration). */
export const editPersonSchema = z.object({
  name: z.string().trim().min(1, 'Enter a name').max(120),
  email: z.email('Enter an e-mail address').max(254),
});
export type EditPersonInput = z.infer<typeof editPersonSchema>;

export const passwordResetRequestSchema = z.object({
  email: z.email('Enter an e-mail address').max(254),
});

export const resetPasswordSchema = z.object({
  token: linkTokenSchema,
  password: passwordSchema,
});

/**
 * Where a person stands: signed up (`active`), invited and not yet signed up, their invitation
 * run out or taken back, or `deactivated` (cannot sign in; their name stays on the record).
 */
export const PERSON_STATUSES = ['active', 'invited', 'invitation-expired', 'invitation-revoked', 'deactivated'] as const;
export type PersonStatus = (typeof PERSON_STATUSES)[number];

export interface PersonRow {
  id: number;
  name: string;
  email: string;
  roles: Role[];
  /** False until the person has set a password from their invitation. */
  active: boolean;
  status: PersonStatus;
  /** ISO time the open invitation runs out, while one is out. */
  invitationExpiresAt: string | null;
  /** The newest invitation mail to this person and where it stands. */
  invitationMail: MailView | null;
}

/**
 * Answer to adding a person or sending a new invitation: the one-time link (shown once) and its mail.
 * `joinedExisting`: the e-mail already had an account (crew elsewhere, or once here); it got the roles
 * at this venue and kept its own name. Such an account that has signed up gets a notice mail and no
 * link (`inviteUrl` null); one that never signed up gets a fresh invitation (its old link stops working).
 * Nothing else of the account (its other venues, its roles there) is in the answer.
 */
export interface AddPersonResult {
  person: PersonRow;
  inviteUrl: string | null;
  mail: MailView | null;
  joinedExisting: boolean;
}

/** The one-time setup code the server prints at start while no venue exists: groups of letters and digits. */
export const setupCodeSchema = z.string().trim().toUpperCase().regex(/^[A-Z0-9]{4}(-[A-Z0-9]{4}){2}$/, 'Enter the setup code shown in the server console (like ABCD-2345-WXYZ)');

/** `POST /api/setup`: the first venue and its first technical director, on an empty install. */
export const firstRunSchema = z.object({
  code: setupCodeSchema,
  venueName: z.string().trim().min(1, 'Enter the venue name').max(120),
  units: z.enum(UNIT_SYSTEMS, 'Choose imperial or metric'),
  name: z.string().trim().min(1, 'Enter your name').max(120),
  email: z.email('Enter an e-mail address').max(254),
  password: passwordSchema,
});
export type FirstRunInput = z.infer<typeof firstRunSchema>;

/** `GET /api/setup`: whether this install still waits for its first venue. */
export interface SetupStatus {
  needed: boolean;
}
