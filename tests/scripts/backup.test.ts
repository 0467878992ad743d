import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { DataSource } from 'typeorm';
import { createTestDatabase, type TestDatabase } from '../support/db';
import { startTestApp, type TestApp } from '../support/app';
import { demoCrew, openDrapeUnload } from '../support/crew';
import { createDataSource } from '../../server/db/data-source';
import { migrate } from '../../server/db/setup';
import { LoadingSessionRow, SessionEventRow } from '../../server/features/sessions/session.entity';
import { toLogEntry } from '../../server/features/sessions/session-log';
import { genesisHash, verifyChain } from '../../server/features/sessions/hash-chain';

const root = resolve(import.meta.dirname, '../..');

/** Every session's chain in a database, checked from its genesis hash to its last entry. */
async function chains(db: DataSource) {
  const sessions = await db.getRepository(LoadingSessionRow).find();
  const out = [];
  for (const s of sessions) {
    const rows = await db.getRepository(SessionEventRow).find({ where: { sessionId: s.id }, order: { seq: 'ASC' } });
    out.push({ id: s.id, entries: rows.length, check: verifyChain(rows.map(toLogEntry), genesisHash(s), s) });
  }
  return out;
}

describe('backup and restore with mariadb-dump (scripts/backup.mjs, scripts/restore.mjs)', () => {
  let t: TestApp;
  let target: TestDatabase;
  let dir: string;

  beforeAll(async () => {
    t = await startTestApp();
    target = await createTestDatabase({ migrate: false });
    dir = mkdtempSync(join(tmpdir(), 'rc-backup-'));
  });
  afterAll(async () => {
    await target.drop();
    await t.close();
    rmSync(dir, { recursive: true, force: true });
  });

  it('restores a database taken while sessions ran, in which every chain still verifies', async () => {
    const crew = await demoCrew(t.url);
    const { sessionId } = await openDrapeUnload(t.url, crew.rail.cookie);
    for (const phone of crew.all) await phone.watch(sessionId);
    await crew.loader1.must(sessionId, { type: 'join', role: 'loader' });
    await crew.sm.must(sessionId, { type: 'join', role: 'stage-manager' });
    // The dump is taken while the stage manager keeps writing notes: one transaction, one moment.
    let noting = true;
    // Paced under the per-socket rate limit (20 events a second), as a person writing notes would be.
    const notes = (async () => {
      for (let n = 0; noting; n++) {
        await crew.sm.must(sessionId, { type: 'note', text: `Note ${n}` });
        await new Promise((r) => setTimeout(r, 100));
      }
    })();
    await new Promise((r) => setTimeout(r, 300));

    const file = join(dir, 'railcall.sql.gz');
    const env = (c: TestDatabase['config']) => ({
      ...process.env, RAILCALL_DB_HOST: c.dbOwner.host, RAILCALL_DB_PORT: String(c.dbOwner.port), RAILCALL_DB_NAME: c.dbOwner.database,
      RAILCALL_DB_OWNER_USER: c.dbOwner.user, RAILCALL_DB_OWNER_PASSWORD: c.dbOwner.password,
    });
    execFileSync(process.execPath, ['scripts/backup.mjs', file], { cwd: root, env: env(t.database.config), stdio: 'pipe' });
    noting = false;
    await notes;
    crew.all.forEach((p) => p.close());
    expect(statSync(file).size).toBeGreaterThan(1000);

    execFileSync(process.execPath, ['scripts/restore.mjs', file], { cwd: root, env: env(target.config), stdio: 'pipe' });
    // As the next server start does: migrations find nothing to run, the app account gets its rights.
    expect(await migrate(target.owner, target.config)).toEqual([]);
    const restored = await chains(target.owner);
    expect(restored.length).toBeGreaterThan(0);
    for (const c of restored) expect(c.check).toEqual({ ok: true });
    expect(restored.find((c) => c.id === sessionId)!.entries).toBeGreaterThan(4);
    // The restored database serves the app account, as in production.
    const app = createDataSource(target.config.db, { poolSize: 1 });
    await app.initialize();
    expect(Number((await app.query('SELECT COUNT(*) AS n FROM session_event'))[0].n)).toBeGreaterThan(4);
    await expect(app.query('DELETE FROM session_event')).rejects.toThrow(/denied/);
    await app.destroy();
  }, 60_000);
});
