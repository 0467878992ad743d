import { hash, verify } from '@node-rs/argon2';

// Argon2id (the library's default algorithm) with its default memory and time costs.
export const hashPassword = (password: string): Promise<string> => hash(password);

/** A hash of nothing anyone knows: verifying against it keeps unknown accounts as slow as known ones. */
let decoyHash: Promise<string> | null = null;

export async function verifyPassword(storedHash: string | null, password: string): Promise<boolean> {
  if (!storedHash) {
    decoyHash ??= hash('decoy password that matches nothing');
    await verify(await decoyHash, password).catch(() => false);
    return false;
  }
  return verify(storedHash, password).catch(() => false);
}
