import type { DataSource } from 'typeorm';

/**
 * Tables the application account may only read and append to: the kept record.
 * The session feature's log table is added here by its migration's owner.
 */
export const APPEND_ONLY_TABLES = new Set<string>(['session_event', 'schedule_change']);

/** Tables the application only reads. */
const READ_ONLY_TABLES = new Set<string>(['schema_migration']);

/**
 * Gives the application account table by table what it needs and no more.
 * MariaDB has no "all but" grant, so rights are set per table after every migration run.
 */
export async function grantAppAccount(owner: DataSource, database: string, appUser: string, appHost = '127.0.0.1'): Promise<void> {
  const tables: { name: string }[] = await owner.query(
    'SELECT TABLE_NAME AS name FROM information_schema.TABLES WHERE TABLE_SCHEMA = ?',
    [database],
  );
  const account = `'${appUser}'@'${appHost}'`;
  for (const { name } of tables) {
    const target = `\`${database}\`.\`${name}\``;
    if (APPEND_ONLY_TABLES.has(name) || READ_ONLY_TABLES.has(name)) {
      await revokeQuietly(owner, `REVOKE UPDATE, DELETE ON ${target} FROM ${account}`);
      const rights = READ_ONLY_TABLES.has(name) ? 'SELECT' : 'SELECT, INSERT';
      await owner.query(`GRANT ${rights} ON ${target} TO ${account}`);
    } else {
      await owner.query(`GRANT SELECT, INSERT, UPDATE, DELETE ON ${target} TO ${account}`);
    }
  }
}

async function revokeQuietly(owner: DataSource, sql: string): Promise<void> {
  try {
    await owner.query(sql);
  } catch (error) {
    // 1147: there was no such grant to take back.
    if ((error as { errno?: number }).errno !== 1147) throw error;
  }
}
