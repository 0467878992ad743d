import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestDatabase, type TestDatabase } from '../support/db';
import { migrate } from '../../server/db/setup';
import { migrations } from '../../server/db/migrations';
import { createDataSource } from '../../server/db/data-source';

describe('migrations', () => {
  let d: TestDatabase;
  beforeAll(async () => { d = await createTestDatabase({ migrate: false }); });
  afterAll(async () => { await d.drop(); });

  const tables = async () => (await d.owner.query('SHOW TABLES') as Record<string, string>[]).map((r) => Object.values(r)[0]).sort();

  it('run on an empty database and create every table', async () => {
    expect(await tables()).toEqual([]);
    const ran = await migrate(d.owner, d.config);
    expect(ran).toHaveLength(migrations.length);
    expect(await tables()).toEqual(expect.arrayContaining(['venue', 'person', 'venue_role', 'line_set', 'piece', 'brick_type', 'http_session', 'schema_migration']));
  });

  it('do nothing the second time', async () => {
    expect(await migrate(d.owner, d.config)).toEqual([]);
  });

  it('leave the application account without rights to change the schema', async () => {
    const app = createDataSource(d.config.db, { poolSize: 1 });
    await app.initialize();
    try {
      await expect(app.query('CREATE TABLE sneaky (id INT)')).rejects.toThrow(/denied/i);
      await expect(app.query('DROP TABLE venue')).rejects.toThrow(/denied/i);
      await expect(app.query('DELETE FROM schema_migration')).rejects.toThrow(/denied/i);
      expect(await app.query('SELECT COUNT(*) AS n FROM venue')).toHaveLength(1);
    } finally {
      await app.destroy();
    }
  });

  it('undo cleanly, newest first', async () => {
    for (let i = 0; i < migrations.length; i++) await d.owner.undoLastMigration({ transaction: 'each' });
    expect(await tables()).toEqual(['schema_migration']);
  });
});
