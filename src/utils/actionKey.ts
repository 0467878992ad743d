/**
 * An idempotency key for one tap: made once, sent with every retry of that tap.
 * `crypto.randomUUID` exists only in secure contexts (https, localhost); a phone on the venue's
 * Wi-Fi over plain http still has `crypto.getRandomValues`, so fall back to it.
 */
export function makeActionKey(): string {
  const c = globalThis.crypto;
  if (typeof c?.randomUUID === 'function') return c.randomUUID();
  const bytes = new Uint8Array(16);
  c.getRandomValues(bytes);
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}
