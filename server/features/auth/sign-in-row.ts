import type { Statement } from '../sessions/hot-path';
import { HttpError } from '../../middleware/http-error';

/**
 * A sign-in as the session store keeps it (table http_session, express-mysql-session's layout), read in
 * the action's own round trip: an action from a socket is checked against the sign-in as it stands now,
 * at no extra trip to the database, even when the sign-out happened on another server process.
 */
export function signInStatement(signInId: string, nowMs: number): Statement {
  // The store's own rule: a row whose `expires` (seconds) is past is no sign-in.
  return { sql: 'SELECT data FROM http_session WHERE session_id = ? AND expires >= ?', params: [signInId, Math.round(nowMs / 1000)] };
}

export type SignInNow = { alive: false } | { alive: true; venueId: number | undefined };

/** What the store's row says of the sign-in of `personId`: ended (no row, expired, or someone else's), or the venue it has chosen. */
export function signInNowOf(rows: unknown[], personId: number): SignInNow {
  const row = rows[0] as { data?: unknown } | undefined;
  if (!row || typeof row.data !== 'string') return { alive: false };
  let data: { passport?: { user?: unknown }; venueId?: unknown };
  try {
    data = JSON.parse(row.data) as typeof data;
  } catch {
    return { alive: false };
  }
  if (data.passport?.user !== personId) return { alive: false };
  return { alive: true, venueId: typeof data.venueId === 'number' ? data.venueId : undefined };
}

/** The sign-in behind a socket has ended: the socket is told and closed. */
export class SignInEnded extends HttpError {
  constructor() {
    super('unauthenticated', 'Your sign-in has ended. Sign in again.');
  }
}

/** The sign-in chose another venue (in another tab) since this socket last looked: the socket catches up and tries once more. */
export class SignInMoved extends HttpError {
  constructor() {
    super('conflict', 'This sign-in now acts on another venue. Reload the page.');
  }
}
