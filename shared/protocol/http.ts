import type { ApiError } from './ack';

/** Every HTTP error answer has this body. */
export interface ErrorBody {
  error: ApiError;
}

/** The demo accounts the seed creates (also used by end-to-end tests). */
export const DEMO_PASSWORD = 'larkspur-demo';
export const DEMO_ACCOUNTS = [
  { email: 'td@larkspur.example', name: 'Morgan Vale', roles: ['admin'] },
  { email: 'rail@larkspur.example', name: 'Jo Castellan', roles: ['rail'] },
  { email: 'loader1@larkspur.example', name: 'Sam Brightwater', roles: ['loader'] },
  { email: 'loader2@larkspur.example', name: 'Alex Tamsin', roles: ['loader'] },
  { email: 'deck@larkspur.example', name: 'Robin Ashby', roles: ['deck'] },
  { email: 'sm@larkspur.example', name: 'Kit Harrow', roles: ['stage-manager'] },
] as const;
