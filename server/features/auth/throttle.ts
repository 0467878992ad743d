import { rateLimit } from 'express-rate-limit';
import type { RequestHandler } from 'express';
import type { Config } from '../../config';
import { HttpError } from '../../middleware/http-error';

/** Failed sign-ins are counted per account and per address; a success does not count. */
export function signInThrottles(config: Config): RequestHandler[] {
  const { windowMs, perAccount, perAddress } = config.signInThrottle;
  const minutes = Math.round(windowMs / 60000);
  const answer = (who: string): RequestHandler => (_req, res) => {
    res.status(429).json(new HttpError('too-many-requests',
      `Too many failed sign-ins ${who}. Wait ${minutes} minutes and try again, or ask your technical director.`).toBody());
  };
  const common = { windowMs, skipSuccessfulRequests: true, standardHeaders: 'draft-8' as const, legacyHeaders: false };
  return [
    rateLimit({ ...common, limit: perAddress, handler: answer('from this device') }),
    rateLimit({
      ...common,
      limit: perAccount,
      keyGenerator: (req) => `account:${String((req.body as { email?: unknown } | undefined)?.email ?? '').trim().toLowerCase()}`,
      handler: answer('for this account'),
    }),
  ];
}

/** Password reset requests, counted whether or not the address has an account (each one may send a mail). */
export function resetThrottles(config: Config): RequestHandler[] {
  const { windowMs, perAccount, perAddress } = config.signInThrottle;
  const minutes = Math.round(windowMs / 60000);
  const answer: RequestHandler = (_req, res) => {
    res.status(429).json(new HttpError('too-many-requests', `Too many password reset requests. Wait ${minutes} minutes and try again.`).toBody());
  };
  const common = { windowMs, standardHeaders: 'draft-8' as const, legacyHeaders: false, handler: answer };
  return [
    rateLimit({ ...common, limit: perAddress }),
    rateLimit({
      ...common,
      limit: perAccount,
      keyGenerator: (req) => `reset:${String((req.body as { email?: unknown } | undefined)?.email ?? '').trim().toLowerCase()}`,
    }),
  ];
}
