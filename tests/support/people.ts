import request from 'supertest';
import { DEMO_PASSWORD } from '@shared/protocol/http';
import type { Role } from '@shared/protocol/roles';
import type { DataSource } from 'typeorm';
import { hashPassword } from '../../server/features/auth/password';
import { DEFAULT_VENUE_SETTINGS } from '../../server/features/venue/venue.entity';

export type Agent = ReturnType<typeof request.agent>;

/** A signed-in HTTP client (cookie jar) for one person. */
export async function signedIn(url: string, email: string, password = DEMO_PASSWORD): Promise<Agent> {
  const agent = request.agent(url);
  const res = await agent.post('/api/auth/sign-in').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}

/** The session cookie an agent holds, as a Cookie header value. */
export function cookieOf(res: { headers: Record<string, unknown> }): string {
  const setCookie = res.headers['set-cookie'] as string[] | undefined;
  const cookie = setCookie?.find((c) => c.startsWith('railcall.sid='));
  if (!cookie) throw new Error('no session cookie was set');
  return cookie.split(';')[0];
}

/** A second venue with one person per given role, to prove venues cannot see each other. */
export async function addVenueWithPeople(owner: DataSource, name: string, roles: Role[]): Promise<{ venueId: number; emails: Record<Role, string> }> {
  const venue = await owner.query('INSERT INTO venue (name, units, settings) VALUES (?, ?, ?)', [name, 'metric', JSON.stringify(DEFAULT_VENUE_SETTINGS)]);
  const venueId = venue.insertId as number;
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const emails = {} as Record<Role, string>;
  for (const role of roles) {
    const email = `${role}@venue${venueId}.example`;
    const person = await owner.query('INSERT INTO person (name, email, password_hash) VALUES (?, ?, ?)', [`${role} of ${name}`, email, passwordHash]);
    await owner.query('INSERT INTO venue_role (venue_id, person_id, role) VALUES (?, ?, ?)', [venueId, person.insertId, role]);
    emails[role] = email;
  }
  return { venueId, emails };
}
