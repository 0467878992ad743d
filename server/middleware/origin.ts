import type { IncomingHttpHeaders } from 'node:http';
import type { RequestHandler } from 'express';
import { HttpError } from './http-error';

export interface OriginPolicy {
  /** Origins people open Railcall at (config.publicOrigins). */
  publicOrigins: readonly string[];
  /** Outside production, an Origin equal to the request's own Host is accepted too (dev proxy, tests on port 0). */
  production: boolean;
}

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/** Content types a browser sends cross-site without asking first (the CORS "simple" ones). */
// multipart/form-data is one too, but photo uploads use it: for those the Origin and Fetch Metadata checks stand alone.
const PREFLIGHT_FREE_TYPES = ['application/x-www-form-urlencoded', 'text/plain'];

/**
 * Cross-site request defence by Fetch Metadata plus Origin (see DEVELOPERS.md, "Requests from other sites"):
 * - an `Origin` header, when present, must be one of the public origins (any method, every socket request);
 * - without one, a browser's `Sec-Fetch-Site: cross-site | same-site` on a state-changing request is refused;
 * - a request with neither comes from no browser (a script, a test client), which carries no victim's cookie.
 * Returns the sentence to refuse with, or null when the request may go on.
 */
export function crossSiteRefusal(method: string, headers: IncomingHttpHeaders, policy: OriginPolicy): string | null {
  const origin = headers.origin;
  if (origin !== undefined) {
    if (policy.publicOrigins.includes(origin)) return null;
    if (!policy.production && origin !== 'null' && URL.parse(origin)?.host === headers.host) return null;
    return `Railcall refused a request sent from another site (${origin.slice(0, 80)}). Open Railcall at its own address.`;
  }
  const site = headers['sec-fetch-site'];
  if (!SAFE_METHODS.has(method) && (site === 'cross-site' || site === 'same-site')) {
    return 'Railcall refused a change sent from another site. Open Railcall at its own address.';
  }
  return null;
}

/** The HTTP side: every /api request passes here before the sign-in is even read. */
export function originGuard(policy: OriginPolicy): RequestHandler {
  return (req, _res, next) => {
    const refusal = crossSiteRefusal(req.method, req.headers, policy);
    if (refusal) return next(new HttpError('forbidden', refusal));
    // The bodies a foreign page can send without a preflight (forms, text/plain) are never taken;
    // JSON and the CSV upload (text/csv) need a preflight, which this server never grants.
    const hasBody = req.headers['transfer-encoding'] !== undefined || Number(req.headers['content-length'] ?? 0) > 0;
    if (!SAFE_METHODS.has(req.method) && hasBody && (!req.headers['content-type'] || req.is(PREFLIGHT_FREE_TYPES))) {
      return next(new HttpError('bad-input', 'Railcall takes changes as JSON (or a CSV file as text/csv), not as a form or plain text.'));
    }
    next();
  };
}
