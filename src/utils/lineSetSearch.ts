import type { LineSetView } from '@shared/protocol/schedule';

/**
 * Whether a line set answers a search as a crew types it: its number, name, notes, or a piece's name
 * or department, any case. An empty search matches every set.
 */
export function lineSetMatches(lineSet: Pick<LineSetView, 'number' | 'name' | 'notes' | 'pieces'>, search: string | null | undefined): boolean {
  const term = (search ?? '').trim().toLowerCase();
  if (!term) return true;
  const text = `${lineSet.number} ${lineSet.name} ${lineSet.notes} ${lineSet.pieces.map((p) => `${p.name} ${p.department}`).join(' ')}`;
  return text.toLowerCase().includes(term);
}
