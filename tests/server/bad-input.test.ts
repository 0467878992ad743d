import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startTestApp, type TestApp } from '../support/app';
import { signedIn, type Agent } from '../support/people';

describe('bad input', () => {
  let t: TestApp;
  let admin: Agent;
  const count = async () => Number((await t.database.owner.query('SELECT COUNT(*) AS n FROM person'))[0].n);

  beforeAll(async () => {
    t = await startTestApp();
    admin = await signedIn(t.url, 'td@larkspur.example');
  });
  afterAll(async () => { await t.close(); });

  const cases: [string, unknown, string[]][] = [
    ['missing fields', {}, ['name', 'email', 'roles']],
    ['wrong types', { name: 42, email: ['x'], roles: 'deck' }, ['name', 'email', 'roles']],
    ['an unknown role', { name: 'A', email: 'a@larkspur.example', roles: ['flyman'] }, ['roles.0']],
    ['a blank name and a bad e-mail', { name: '   ', email: 'not-an-email', roles: ['deck'] }, ['name', 'email']],
  ];
  for (const [what, body, fields] of cases) {
    it(`answers ${what} with 400, every problem named, nothing written`, async () => {
      const before = await count();
      const res = await admin.post('/api/people').send(body as object);
      expect(res.status).toBe(400);
      expect(res.body.error.code).toBe('bad-input');
      expect(Object.keys(res.body.error.fields).sort()).toEqual([...fields].sort());
      expect(res.body.error.message).toMatch(/not valid/);
      expect(await count()).toBe(before);
    });
  }

  it('answers a person with a sentence and a program with the field paths', async () => {
    const res = await admin.post('/api/sessions/1/actions').send({ key: '6f1c1d36-1a8e-4c51-a0c4-0d9f1f3b8a11', action: { type: 'join', role: 'deck' } });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.clientTimeMs).toEqual([expect.stringMatching(/number/)]);
    expect(res.body.error.message).toBe('The request is not valid: check the client time, then try again.');
    const nested = await admin.post('/api/people').send({ name: 'A', email: 'a@larkspur.example', roles: ['flyman'] });
    expect(nested.body.error.message).toBe('The request is not valid: check the roles, then try again.');
    expect(nested.body.error.message).not.toMatch(/Invalid|expected/);
  });

  it('answers an oversized body with 400 and writes nothing', async () => {
    const before = await count();
    const res = await admin.post('/api/people').send({ name: 'x'.repeat(40 * 1024), email: 'big@larkspur.example', roles: ['deck'] });
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/too large/);
    expect(await count()).toBe(before);
  });

  it('answers a body that is not JSON with 400', async () => {
    const res = await admin.post('/api/people').set('Content-Type', 'application/json').send('{"name": ');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/not valid JSON/);
  });

  it('answers a bad id in the address with 400', async () => {
    const res = await admin.put('/api/people/abc/roles').send({ roles: [] });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.id).toBeDefined();
  });

  it('strips unknown keys instead of storing them', async () => {
    const res = await admin.post('/api/people').send({ name: 'Lee Ward', email: 'lee@larkspur.example', roles: ['deck'], isRoot: true });
    expect(res.status).toBe(201);
    expect(res.body.person).not.toHaveProperty('isRoot');
  });
});
