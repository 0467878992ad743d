import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { startTestApp, type TestApp } from '../support/app';
import { newSetupCode } from '../../server/features/setup/setup.service';

const CODE = 'K7QM-4XRT-PW9B';
const form = (over: Record<string, unknown> = {}) => ({
  code: CODE, venueName: 'Thistledown Opera House', units: 'metric', name: 'Rowan Ashdown', email: 'Rowan@Thistledown.example', password: 'counterweight-first', ...over,
});

describe('first-run setup', () => {
  let t: TestApp;
  beforeAll(async () => { t = await startTestApp({ seed: false, setupCode: CODE }); });
  afterAll(async () => { await t.close(); });

  const count = async (table: string) => Number((await t.database.owner.query(`SELECT COUNT(*) AS n FROM ${table}`))[0].n);

  it('is offered on an empty database', async () => {
    expect((await request(t.url).get('/api/setup')).body).toEqual({ needed: true });
  });

  it('refuses a wrong code and writes nothing', async () => {
    const res = await request(t.url).post('/api/setup').send(form({ code: 'AAAA-BBBB-CCCC' }));
    expect(res.status).toBe(403);
    expect(res.body.error.fields.code).toBeDefined();
    expect(await count('venue')).toBe(0);
    expect(await count('person')).toBe(0);
  });

  it('answers bad input with every field error, and writes nothing', async () => {
    const res = await request(t.url).post('/api/setup').send({ code: 'nope', venueName: '', units: 'cubits', name: '', email: 'not-mail', password: 'short' });
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['code', 'email', 'name', 'password', 'units', 'venueName']);
    expect(await count('venue')).toBe(0);
  });

  it('creates the venue and its technical director with the code, and signs them in', async () => {
    const agent = request.agent(t.url);
    const res = await agent.post('/api/setup').send(form({ code: CODE.toLowerCase() }));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body).toMatchObject({ name: 'Rowan Ashdown', email: 'rowan@thistledown.example', roles: ['admin'], venue: { name: 'Thistledown Opera House', units: 'metric' } });
    expect((await agent.get('/api/me')).body.roles).toEqual(['admin']);
    // The director signs in again with what they chose.
    const again = await request(t.url).post('/api/auth/sign-in').send({ email: 'rowan@thistledown.example', password: 'counterweight-first' });
    expect(again.status).toBe(200);
  });

  it('is gone once used: the same code and a second setup are refused', async () => {
    expect((await request(t.url).get('/api/setup')).body).toEqual({ needed: false });
    const res = await request(t.url).post('/api/setup').send(form({ venueName: 'Second claim', email: 'second@example.org' }));
    expect(res.status).toBe(404);
    expect(await count('venue')).toBe(1);
    expect(await count('person')).toBe(1);
  });

  it('is not offered after a restart of a set-up install (no code is printed then)', async () => {
    const restarted = await t.restart();
    expect((await request(restarted.url).get('/api/setup')).body).toEqual({ needed: false });
    await restarted.stop();
  });
});

describe('first-run setup without a code', () => {
  it('is not offered by a server started without a code, even on an empty database', async () => {
    const t = await startTestApp({ seed: false });
    try {
      expect((await request(t.url).get('/api/setup')).body).toEqual({ needed: false });
      expect((await request(t.url).post('/api/setup').send(form())).status).toBe(404);
    } finally {
      await t.close();
    }
  });

  it('makes codes of three groups of four from an alphabet without look-alike characters', () => {
    const codes = new Set(Array.from({ length: 50 }, newSetupCode));
    expect(codes.size).toBe(50);
    for (const code of codes) expect(code).toMatch(/^[A-HJ-NP-Z2-9]{4}-[A-HJ-NP-Z2-9]{4}-[A-HJ-NP-Z2-9]{4}$/);
  });
});
