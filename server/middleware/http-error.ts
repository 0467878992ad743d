import type { ApiError, ErrorCode } from '@shared/protocol/ack';

const STATUS: Record<ErrorCode, number> = {
  'bad-input': 400,
  unauthenticated: 401,
  forbidden: 403,
  'not-found': 404,
  conflict: 409,
  refused: 409,
  'too-many-requests': 429,
  internal: 500,
  unavailable: 503,
};

/** An error that carries its HTTP status, a known code and a message written for the person. */
export class HttpError extends Error {
  readonly status: number;
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly fields?: Record<string, string[]>,
  ) {
    super(message);
    this.status = STATUS[code];
  }

  toBody(): { error: ApiError } {
    return { error: { code: this.code, message: this.message, ...(this.fields ? { fields: this.fields } : {}) } };
  }
}

/** mysql2's codes for a database that cannot be reached, went away mid-query, or rolled the transaction back (a deadlock victim). */
const DB_GONE = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'PROTOCOL_CONNECTION_LOST', 'ER_SERVER_SHUTDOWN', 'ER_CON_COUNT_ERROR', 'ER_CONNECTION_KILLED', 'ER_LOCK_WAIT_TIMEOUT', 'ER_LOCK_DEADLOCK']);

/**
 * The database is out of reach (restarting, failing over): answered 503 `unavailable` so phones keep
 * the tap and send it again with the same key. A transaction that lost its connection was rolled back.
 */
export function unavailableFrom(error: unknown): HttpError | null {
  const e = error as { code?: unknown; driverError?: { code?: unknown }; message?: unknown } | null;
  const code = e?.code ?? e?.driverError?.code;
  const gone = (typeof code === 'string' && DB_GONE.has(code)) || (typeof e?.message === 'string' && /Pool is closed|connection is in closed state|Can't add new command when connection is in closed state/.test(e.message));
  return gone ? new HttpError('unavailable', 'Railcall cannot reach its records for a moment. Nothing was done: try again.') : null;
}

export const notFound = (what = 'That') => new HttpError('not-found', `${what} was not found.`);
export const forbidden = () => new HttpError('forbidden', 'Your roles at this venue do not allow that.');
export const unauthenticated = () => new HttpError('unauthenticated', 'Sign in first.');
