/** Error codes the server answers with; the message beside each is written for the person. */
export const ERROR_CODES = [
  'bad-input',
  'unauthenticated',
  'forbidden',
  'not-found',
  'conflict',
  'too-many-requests',
  'refused',
  'internal',
  /** The server cannot reach its database for a moment: nothing was done; send the same action again. */
  'unavailable',
] as const;
export type ErrorCode = (typeof ERROR_CODES)[number];

export interface ApiError {
  code: ErrorCode;
  message: string;
  /** Field-level problems for bad-input: `{ "email": ["Enter an e-mail address"] }`. */
  fields?: Record<string, string[]>;
}

/** Every Socket.IO acknowledgement has this shape. */
export type Ack<T> = ({ ok: true } & T) | { ok: false; error: ApiError };
