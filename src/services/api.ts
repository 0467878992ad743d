import type { AddPersonInput, AddPersonResult, Me, PersonRow, SignInInput } from '@shared/protocol/people';
import type { Role } from '@shared/protocol/roles';
import { ApiFailure, http } from './http';

/**
 * One function per server route: typed promises, no state. Stores call these.
 */

export const getMe = () => http.get<Me>('/api/me');

/** The signed-in person, or null when nobody is signed in (401). */
export async function getMeOrNull(): Promise<Me | null> {
  try {
    return await getMe();
  } catch (error) {
    if (error instanceof ApiFailure && error.status === 401) return null;
    throw error;
  }
}

export const signIn = (input: SignInInput) => http.post<Me>('/api/auth/sign-in', input);
export const signOut = () => http.post<void>('/api/auth/sign-out');
export const acceptInvite = (token: string, password: string) =>
  http.post<Me>('/api/auth/accept-invite', { token, password });

export const listPeople = () => http.get<{ people: PersonRow[] }>('/api/people');
export const addPerson = (input: AddPersonInput) => http.post<AddPersonResult>('/api/people', input);
export const setPersonRoles = (id: number, roles: Role[]) =>
  http.put<{ person: PersonRow }>(`/api/people/${id}/roles`, { roles });

/**
 * What the home screens show of a running loading session.
 * TODO: import the summary type from shared/protocol/session when it lands; until then
 * only the fields every variant will have are read.
 */
export interface ActiveSessionSummary {
  id: number;
  title?: string;
  name?: string;
  startedAt?: string;
}

/** Running loading sessions of the venue; a 404 (route not there yet) counts as none. */
export async function listActiveSessions(): Promise<ActiveSessionSummary[]> {
  try {
    const answer = await http.get<{ sessions?: ActiveSessionSummary[] }>('/api/sessions', { query: { active: 1 } });
    return answer?.sessions ?? [];
  } catch (error) {
    if (error instanceof ApiFailure && error.status === 404) return [];
    throw error;
  }
}
