import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { freePort } from '../../scripts/lib/mariadb.mjs';
import { seedIfEmpty } from '../../server/db/setup';
import { createTestDatabase, type TestDatabase } from '../support/db';
import { CREW_EMAILS, drapeUnloadWalk, openDrapeUnloadAt, RoamingPhone, serverEnv, startNginx, startRedis, startServer, upstreamFor, type Child } from '../support/cluster';

describe('two server processes behind nginx, sharing Socket.IO through Redis', () => {
  let database: TestDatabase;
  let dir: string;
  let redis: Child;
  let nginx: Child;
  const servers: Child[] = [];
  const ports: number[] = [];
  let url: string;
  let nginxPort: number;
  let phones: RoamingPhone[] = [];

  beforeAll(async () => {
    database = await createTestDatabase();
    await seedIfEmpty(database.owner);
    dir = mkdtempSync(join(tmpdir(), 'railcall-cluster-'));
    const redisPort = await freePort();
    redis = await startRedis(redisPort);
    for (const name of ['A', 'B']) {
      const port = await freePort();
      ports.push(port);
      servers.push(await startServer(`server ${name}`, serverEnv(database.config, port, { RAILCALL_REDIS_URL: `redis://127.0.0.1:${redisPort}` })));
    }
    nginxPort = await freePort();
    nginx = await startNginx(dir, nginxPort, ports);
    url = `http://127.0.0.1:${nginxPort}`;
  }, 300_000);

  afterAll(async () => {
    phones.forEach((p) => p.close());
    await nginx?.stop();
    for (const s of servers) await s.stop();
    await redis?.stop();
    await database?.drop();
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('puts the five phones of one session on both processes; a process killed mid-session loses no phone an entry', async () => {
    // nginx is sticky by address (ip_hash on the first three octets): pick loopback addresses it sends to A and to B.
    const at: Record<string, string[]> = {};
    for (let n = 1; n <= 80 && ((at[`127.0.0.1:${ports[0]}`]?.length ?? 0) < 2 || (at[`127.0.0.1:${ports[1]}`]?.length ?? 0) < 3); n++) {
      const address = `127.0.${n}.1`;
      const upstream = await upstreamFor(nginxPort, address);
      (at[upstream] ??= []).push(address);
    }
    const onA = at[`127.0.0.1:${ports[0]}`].slice(0, 2);
    const onB = at[`127.0.0.1:${ports[1]}`].slice(0, 3);
    // Rail operator and first loader on A, second loader, deck and stage manager on B.
    const addresses = [...onA, ...onB];
    phones = await Promise.all(CREW_EMAILS.map((email, i) => RoamingPhone.signIn(url, email, addresses[i])));
    for (const [i, address] of addresses.entries()) expect(await upstreamFor(nginxPort, address)).toBe(`127.0.0.1:${ports[i < 2 ? 0 : 1]}`);

    const sessionId = await openDrapeUnloadAt(url, phones[0].cookie);
    let lastWatch: Awaited<ReturnType<RoamingPhone['watch']>> | null = null;
    for (const phone of phones) lastWatch = await phone.watch(sessionId);
    // Presence is asked of both processes: the last phone in sees all five.
    expect(lastWatch!.ok && (lastWatch!.presence as Array<{ connected: boolean }>).filter((p) => p.connected)).toHaveLength(5);

    const walk = drapeUnloadWalk();
    for (const [n, [who, action]] of walk.entries()) {
      if (n === 9) {
        // Mid-session: the next tap goes out and, a moment later, process A dies without a word.
        const tap = phones[who].act(action);
        await new Promise((r) => setTimeout(r, 5));
        await servers[0].kill();
        const answer = await tap;
        expect(answer.ok).toBe(true);
        continue;
      }
      await phones[who].must(action);
    }

    const record = await (await fetch(`${url}/api/sessions/${sessionId}/record`, { headers: { Cookie: phones[4].cookie } })).json();
    expect(record.chain).toEqual({ ok: true });
    const entries = record.entries as Array<{ seq: number; hash: string }>;
    expect(entries.map((e) => e.seq)).toEqual(entries.map((_, i) => i + 1));
    // Opened, the lead joined at opening, then one entry per tap of the walk, and "finished" after the test of balance:
    // nothing lost, nothing twice.
    expect(entries).toHaveLength(2 + walk.length + 1);
    for (const phone of phones) {
      await phone.caughtUpTo(record.lastSeq, 5000);
      expect([...phone.entries.values()].sort((a, b) => a.seq - b.seq).map((e) => e.hash)).toEqual(entries.map((e) => e.hash));
    }
    const seqs = phones.flatMap((p) => p.answers.map((a) => (a.answer.ok ? a.answer.seq : -1)));
    expect(new Set(seqs).size).toBe(walk.length);
    expect(seqs.every((s) => s > 1)).toBe(true);
  }, 300_000);
});
