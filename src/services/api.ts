import type { PhotoView } from '@shared/protocol/photos';
import type { AddPersonInput, AddPersonResult, EditPersonInput, FirstRunInput, Me, NewVenueInput, SetupStatus, PersonRow, SignInInput } from '@shared/protocol/people';
import type { MailboxMessage, MailView, RecipientRow, ReportMailInput } from '@shared/protocol/mail';
import type { FinishPracticeInput, PracticeDetail, PracticeStart, PracticeSummary, StartPracticeInput } from '@shared/protocol/practice';
import type { Role } from '@shared/protocol/roles';
import type {
  BrickTypeFields,
  BrickTypeView,
  HistoryEntry,
  LineSetFields,
  LineSetHistory,
  LineSetView,
  PieceFields,
  ScheduleView,
  VenueInput,
  VenueView,
} from '@shared/protocol/schedule';
import type { CsvImportResult } from '@shared/protocol/schedule-csv';
import type { CreateSessionInput, EventsPage, PresenceEntry, SessionSummary } from '@shared/protocol/sessions-api';
import type { LogEntry, SessionState } from '@shared/protocol/session';
import type { ChainCheck, HistoryAnswer, LineSetRecord, SessionReport, VerifyAnswer } from '@shared/protocol/record';
import { ApiFailure, failureFromAnswer, http } from './http';

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

/** Whether this install still waits for its first venue (first-run setup). */
export const getSetupStatus = () => http.get<SetupStatus>('/api/setup');
/** Creates the first venue and its technical director; the server signs them in. */
export const completeSetup = (input: FirstRunInput) => http.post<Me>('/api/setup', input);

/** Act on another venue where the person holds a role; the server checks it and answers the new Me. */
export const chooseVenue = (venueId: number) => http.put<Me>('/api/me/venue', { venueId });
/** Opens another venue with the person as its technical director; the sign-in acts on it from now on. */
export const openVenue = (input: NewVenueInput) => http.post<Me>('/api/venues', input);

export const requestPasswordReset = (email: string) => http.post<{ message: string }>('/api/auth/password-reset', { email });
export const resetPassword = (token: string, password: string) => http.post<Me>('/api/auth/reset-password', { token, password });

export const editPerson = (id: number, input: EditPersonInput) => http.put<{ person: PersonRow }>(`/api/people/${id}`, input);
export const resendInvitation = (id: number) => http.post<AddPersonResult>(`/api/people/${id}/invitation`);
export const revokeInvitation = (id: number) => http.del<{ person: PersonRow }>(`/api/people/${id}/invitation`);
export const deactivatePerson = (id: number) => http.post<{ person: PersonRow }>(`/api/people/${id}/deactivate`);
export const reactivatePerson = (id: number) => http.post<{ person: PersonRow }>(`/api/people/${id}/reactivate`);

export const getOutbox = () => http.get<{ messages: MailView[] }>('/api/mail/outbox');
export const sendMailAgain = (id: number) => http.post<{ messages: MailView[] }>(`/api/mail/${id}/send-again`);
export const getRecipients = () => http.get<{ people: RecipientRow[] }>('/api/mail/recipients');
export const mailSessionReport = (sessionId: number, input: ReportMailInput) =>
  http.post<{ messages: MailView[] }>(`/api/sessions/${sessionId}/report-mail`, input);
/** The local fake mail server's messages (development only: 404 in production). */
export const getDevMailbox = () => http.get<{ messages: MailboxMessage[] }>('/api/dev/mailbox');

export const listPeople = () => http.get<{ people: PersonRow[] }>('/api/people');
export const addPerson = (input: AddPersonInput) => http.post<AddPersonResult>('/api/people', input);
export const setPersonRoles = (id: number, roles: Role[]) =>
  http.put<{ person: PersonRow }>(`/api/people/${id}/roles`, { roles });

/** Running loading sessions of the venue. */
export async function listActiveSessions(): Promise<SessionSummary[]> {
  const answer = await http.get<{ sessions: SessionSummary[] }>('/api/sessions', { query: { active: 1 } });
  return answer.sessions;
}

export const getSchedule = () => http.get<ScheduleView>('/api/schedule');

export const createSession = (input: CreateSessionInput) =>
  http.post<{ session: SessionSummary; state: SessionState }>('/api/sessions', input);

export interface SessionSnapshot {
  session: SessionSummary;
  state: SessionState;
  lastSeq: number;
  presence: PresenceEntry[];
}

export const getSession = (id: number) => http.get<SessionSnapshot>(`/api/sessions/${id}`);

/** One page of log entries after `afterSeq`, for catching up when the live connection cannot. */
export const getSessionEvents = (id: number, afterSeq: number, limit?: number) =>
  http.get<EventsPage<LogEntry>>(`/api/sessions/${id}/events`, { query: { after: afterSeq, limit } });

/** Follows a paged log from `afterSeq` to its end: every entry, and the last seq the server named. */
export async function followEventPages<E>(getPage: (after: number) => Promise<EventsPage<E>>, afterSeq: number): Promise<{ entries: E[]; lastSeq: number }> {
  const entries: E[] = [];
  let after = afterSeq;
  for (;;) {
    const page = await getPage(after);
    entries.push(...page.entries);
    // A page that does not move on ends the walk (nothing more to fetch, or a server that says otherwise).
    if (!page.more || page.nextAfter <= after) return { entries, lastSeq: page.lastSeq };
    after = page.nextAfter;
  }
}

/** Every log entry after `afterSeq`, page after page (each page at most 500 entries). */
export const getAllSessionEvents = (id: number, afterSeq: number) => followEventPages((after) => getSessionEvents(id, after), afterSeq);

export const startPractice = (input: StartPracticeInput) => http.post<PracticeStart>('/api/practice-runs', input);
export const keepPractice = (id: number, input: FinishPracticeInput) => http.put<PracticeDetail>(`/api/practice-runs/${id}/result`, input);
export async function listPractices(personId?: number): Promise<PracticeSummary[]> {
  const answer = await http.get<{ practices: PracticeSummary[] }>('/api/practice-runs', personId ? { query: { personId } } : {});
  return answer.practices;
}
export const getPractice = (id: number) => http.get<PracticeDetail>(`/api/practice-runs/${id}`);

// The record of past sessions.
export const getHistory = (query: { lineSetId?: number; personId?: number; from?: string; to?: string }) =>
  http.get<HistoryAnswer>('/api/record/sessions', { query });
export const getReport = (id: number) => http.get<{ report: SessionReport; charts: Record<string, string> }>(`/api/record/sessions/${id}/report`);
export const checkSessionChain = (id: number) => http.get<{ chain: ChainCheck }>(`/api/record/sessions/${id}/check`);
export const verifyExport = (fileName: string, text: string) => http.post<VerifyAnswer>('/api/record/verify', { fileName, text });
export const getLineSetRecord = (id: number) => http.get<LineSetRecord>(`/api/record/line-sets/${id}`);
/** Addresses the browser downloads itself (the PDF, the CSV, the exported record). */
export const reportPdfUrl = (id: number) => `/api/record/sessions/${id}/report.pdf`;
export const reportCsvUrl = (id: number) => `/api/record/sessions/${id}/report.csv`;
export const recordExportUrl = (id: number) => `/api/sessions/${id}/record`;
// ---------------------------------------------------------------------------------------------
// The venue's data: settings, line sets, pieces, bricks, history, CSV.

export const getVenue = () => http.get<{ venue: VenueView }>('/api/venue');
export const saveVenue = (input: VenueInput) => http.put<{ venue: VenueView }>('/api/venue', input);
export const getVenueHistory = () => http.get<{ entries: HistoryEntry[] }>('/api/venue/history');

export const createLineSet = (lineSet: LineSetFields, reason?: string) =>
  http.post<{ lineSet: LineSetView }>('/api/line-sets', { lineSet, reason });
export const updateLineSet = (id: number, lineSet: LineSetFields, version: number, reason?: string) =>
  http.put<{ lineSet: LineSetView }>(`/api/line-sets/${id}`, { lineSet, version, reason });
export const deleteLineSet = (id: number, version: number, reason?: string) =>
  http.request<void>(`/api/line-sets/${id}`, { method: 'DELETE', body: { version, reason } });
export const setLineSetService = (id: number, version: number, inService: boolean, reason?: string) =>
  http.put<{ lineSet: LineSetView }>(`/api/line-sets/${id}/service`, { version, inService, reason });
export const getLineSetHistory = (id: number) => http.get<LineSetHistory>(`/api/line-sets/${id}/history`);

export const addPiece = (lineSetId: number, piece: PieceFields, version: number, reason?: string) =>
  http.post<{ lineSet: LineSetView }>(`/api/line-sets/${lineSetId}/pieces`, { piece, version, reason });
export const updatePiece = (id: number, piece: PieceFields, version: number, reason?: string) =>
  http.put<{ lineSet: LineSetView }>(`/api/pieces/${id}`, { piece, version, reason });
export const deletePiece = (id: number, version: number, reason?: string) =>
  http.request<{ lineSet: LineSetView }>(`/api/pieces/${id}`, { method: 'DELETE', body: { version, reason } });

export const createBrickType = (brickType: BrickTypeFields, reason?: string) =>
  http.post<{ brickType: BrickTypeView }>('/api/brick-types', { brickType, reason });
export const updateBrickType = (id: number, brickType: BrickTypeFields, reason?: string) =>
  http.put<{ brickType: BrickTypeView }>(`/api/brick-types/${id}`, { brickType, reason });
export const deleteBrickType = (id: number, reason?: string) =>
  http.request<void>(`/api/brick-types/${id}`, { method: 'DELETE', body: { reason } });
export const setBridgeStock = (id: number, bridgeCount: number, reason: string) =>
  http.put<{ brickType: BrickTypeView }>(`/api/brick-types/${id}/stock`, { bridgeCount, reason });

/** Where the browser downloads the schedule CSV (a plain link: the cookie goes along). */
export const SCHEDULE_CSV_URL = '/api/schedule/csv';

async function sendCsv<T>(path: string, csv: string): Promise<T> {
  let response: Response;
  try {
    response = await fetch(path, { method: 'POST', headers: { 'Content-Type': 'text/csv', Accept: 'application/json' }, body: csv, credentials: 'same-origin' });
  } catch {
    throw new ApiFailure(0, 'network', 'No answer from Railcall: check the connection and try again.');
  }
  const body = await response.json().catch(() => undefined);
  if (!response.ok) throw failureFromAnswer(response.status, body);
  return body as T;
}
export const previewScheduleCsv = (csv: string) => sendCsv<CsvImportResult>('/api/schedule/csv/preview', csv);
export const importScheduleCsv = (csv: string, token: string) =>
  sendCsv<CsvImportResult>(`/api/schedule/csv/import?token=${encodeURIComponent(token)}`, csv);

export async function listPhotos(lineSetId: number): Promise<PhotoView[]> {
  return (await http.get<{ photos: PhotoView[] }>(`/api/line-sets/${lineSetId}/photos`)).photos;
}
export const deletePhoto = (id: number) => http.del<void>(`/api/photos/${id}`);
/** A photo goes as multipart form data (the JSON client does not carry files). */
export async function uploadPhoto(lineSetId: number, file: File, caption: string, pieceId?: number): Promise<PhotoView> {
  const form = new FormData();
  form.append('photo', file);
  form.append('caption', caption);
  if (pieceId) form.append('pieceId', String(pieceId));
  let response: Response;
  try {
    response = await fetch(`/api/line-sets/${lineSetId}/photos`, { method: 'POST', body: form, credentials: 'same-origin', headers: { Accept: 'application/json' } });
  } catch {
    throw failureFromAnswer(0, null);
  }
  const body: unknown = await response.json().catch(() => null);
  if (!response.ok) throw failureFromAnswer(response.status, body);
  return (body as { photo: PhotoView }).photo;
}
