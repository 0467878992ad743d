import type { ErrorRequestHandler, RequestHandler } from 'express';
import type { Logger } from '../logger';
import { HttpError, unavailableFrom } from './http-error';

/** body-parser errors carry a `type`; answer them as bad input in plain words. */
function fromBodyParser(error: unknown, limit: string): HttpError | null {
  const type = (error as { type?: string }).type;
  if (type === 'entity.too.large') return new HttpError('bad-input', `The request is too large (the limit is ${limit}).`);
  if (type === 'entity.parse.failed') return new HttpError('bad-input', 'The request body is not valid JSON.');
  if (type === 'encoding.unsupported' || type === 'charset.unsupported') {
    return new HttpError('bad-input', 'The request body must be UTF-8 JSON.');
  }
  return null;
}

export function errorHandler(logger: Logger, jsonLimit: string): ErrorRequestHandler {
  return (error, req, res, _next) => {
    const known = error instanceof HttpError ? error : fromBodyParser(error, jsonLimit) ?? unavailableFrom(error);
    if (known) {
      res.status(known.status).json(known.toBody());
      return;
    }
    // Anything unexpected: logged in full here, a generic message to the person.
    logger.error({ err: error, method: req.method, url: req.originalUrl }, 'unhandled error');
    res.status(500).json(new HttpError('internal', 'Something went wrong on the server. Try again.').toBody());
  };
}

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json(new HttpError('not-found', `No such API route: ${req.method} ${req.originalUrl}`).toBody());
};
