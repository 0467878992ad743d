/**
 * InnoDB may pick a transaction as the victim of a deadlock and roll it back whole; MariaDB's manual
 * says to be ready to run it again. Only work that is safe to repeat from the start goes through here.
 */
export function isDeadlock(error: unknown): boolean {
  const e = error as { code?: unknown; errno?: unknown; driverError?: { code?: unknown; errno?: unknown } } | null;
  const code = e?.code ?? e?.driverError?.code;
  const errno = e?.errno ?? e?.driverError?.errno;
  return code === 'ER_LOCK_DEADLOCK' || errno === 1213;
}

/** Runs `work` again (after a short, growing pause) when it was rolled back by a deadlock. */
export async function retryOnDeadlock<T>(work: () => Promise<T>, tries = 5): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await work();
    } catch (error) {
      if (!isDeadlock(error) || attempt >= tries) throw error;
      await new Promise((resolve) => setTimeout(resolve, 5 * attempt + Math.random() * 10));
    }
  }
}
