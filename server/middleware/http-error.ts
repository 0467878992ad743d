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

export const notFound = (what = 'That') => new HttpError('not-found', `${what} was not found.`);
export const forbidden = () => new HttpError('forbidden', 'Your roles at this venue do not allow that.');
export const unauthenticated = () => new HttpError('unauthenticated', 'Sign in first.');
