/**
 * The words a phone speaks for a log entry: the calls of the trade, short, as a rail operator would
 * say them ("Line set 12 coming in", "Hold, hold, hold", "Loading complete"). Pure, for tests.
 */
import type { SessionRole } from '@shared/protocol/roles';

export interface SpeakableEntry {
  kind: string;
  details: Record<string, unknown>;
  personName?: string;
}

/** "Line set 12 (LX truss)" → "Line set 12"; a name without a number is said whole. */
export function spokenLineSet(name: unknown): string {
  const text = typeof name === 'string' ? name.trim() : '';
  if (!text) return 'The line set';
  const numbered = /^line set\s+(\S+?)(?:\s*\(|$)/i.exec(text);
  if (numbered) return `Line set ${numbered[1]}`;
  return /^\d+[A-Za-z]?$/.test(text) ? `Line set ${text}` : text;
}

/** What to say for this entry on a phone of this role, or null to stay quiet. */
export function spokenWords(entry: SpeakableEntry, role: SessionRole | null): string | null {
  const set = spokenLineSet(entry.details.lineSetName);
  switch (entry.kind) {
    case 'began':
      return 'Loading begins';
    case 'move-called':
      return `${set} coming in`;
    case 'clear-answered':
      // The rail operator listens for every answer; everyone else hears only the calls.
      return role === 'rail' ? `${firstName(entry.personName)}, clear` : null;
    case 'clear-recorded-for':
      // The lead recorded it: the rail hears whose answer it stands for.
      return role === 'rail' ? `${firstName(String(entry.details.forName ?? ''))}, clear, recorded` : null;
    case 'locked':
      return `${set} in and locked`;
    case 'tied-off':
      return `${set} tied off`;
    case 'rail-clear-called':
      return 'Clear the rail';
    case 'rail-clear-confirmed':
      return 'Rail is clear. Loaders, go ahead';
    case 'loading-complete':
      return 'Loading complete';
    case 'untied':
      return `${set} untied`;
    case 'test-recorded':
      return entry.details.result === 'balanced' ? `${set} tested, balanced` : `${set} tested, out of balance`;
    case 'hold-called': {
      const reason = typeof entry.details.reason === 'string' && entry.details.reason.trim() ? `. ${entry.details.reason.trim()}` : '';
      return `Hold, hold, hold${reason}`;
    }
    case 'hold-reason-given': {
      const reason = typeof entry.details.reason === 'string' ? entry.details.reason.trim() : '';
      return reason ? `Hold: ${reason}` : null;
    }
    case 'hold-released':
      return 'Hold released';
    case 'finished':
      return 'Loading session finished';
    case 'ended':
      return 'Loading session ended';
    default:
      return null;
  }
}

/** What to say when Railcall re-alerts this person: the call again, and what is wanted. */
export function spokenReAlert(lineSetName: unknown): string {
  return `${spokenLineSet(lineSetName)} coming in. Answer clear`;
}

function firstName(name: string | undefined): string {
  return name?.trim().split(/\s+/)[0] || 'Someone';
}
