import { createHash } from 'node:crypto';
import { In, type DataSource, type EntityManager } from 'typeorm';
import { parse } from 'csv-parse/sync';
import { stringify } from 'csv-stringify/sync';
import { KG_PER_LB, M_PER_FT } from '@shared/rigging';
import type { UnitSystem } from '@shared/protocol/people';
import { lineSetFieldsSchema, pieceFieldsSchema, type LineSetFields, type PieceFields } from '@shared/protocol/schedule';
import {
  CSV_COLUMNS,
  csvHeader,
  csvHeaders,
  type CsvColumn,
  type CsvFieldChange,
  type CsvImportResult,
  type CsvLineSetChange,
  type CsvRowError,
} from '@shared/protocol/schedule-csv';
import { HttpError, forbidden } from '../../middleware/http-error';
import type { SignedInUser } from '../people/people.service';
import { BrickTypeRow } from './brick-type.entity';
import { LineSetRow } from './line-set.entity';
import { PieceRow } from './piece.entity';
import { diffFields, recordChanges, type ChangeEntry } from './history';
import { LINE_SET_FIELDS, PIECE_FIELDS, lineSetFieldsOf, mayEditLineSets, pieceFieldsOf } from './schedule-edit.service';
import { openSessionsByLineSet } from './schedule.service';
import type { ScheduleService } from './schedule.service';

/** Decimals written: 0.0001 ft is 0.03 mm, 0.0001 lb is 0.05 g. Import compares at the same precision. */
const DECIMALS = 4;
/** Line sets or pieces per multi-row INSERT: a few hundred bytes each, far below max_allowed_packet. */
const ROWS_PER_INSERT = 500;

/** SI value -> the number a venue reads, and back. Exact factors: 1 lb = 0.45359237 kg, 1 ft = 0.3048 m. */
function toUnits(quantity: CsvColumn['quantity'], si: number, units: UnitSystem): number {
  if (units === 'metric') return si;
  if (quantity === 'mass') return si / KG_PER_LB;
  if (quantity === 'mass-per-length') return (si / KG_PER_LB) * M_PER_FT;
  return si / M_PER_FT;
}
function fromUnits(quantity: CsvColumn['quantity'], value: number, units: UnitSystem): number {
  if (units === 'metric') return value;
  if (quantity === 'mass') return value * KG_PER_LB;
  if (quantity === 'mass-per-length') return (value * KG_PER_LB) / M_PER_FT;
  return value * M_PER_FT;
}
const formatNumber = (v: number) => {
  const rounded = Number(v.toFixed(DECIMALS));
  return String(Object.is(rounded, -0) ? 0 : rounded);
};

type Cells = Record<string, string>;
const COLUMN = Object.fromEntries(CSV_COLUMNS.map((c) => [c.key, c])) as Record<string, CsvColumn>;

/** Which field of a line set or piece each column writes. */
const LINE_SET_COLUMN: Record<string, keyof LineSetFields | 'outOfService'> = {
  line_set: 'number', name: 'name', distance_from_plaster_line: 'distanceM', purchase: 'purchase', pipe: 'pipeSize',
  pipe_weight: 'pipeKgPerM', batten_length: 'pipeLengthM', lift_lines: 'liftLinesM', batten_rating: 'battenRatingKgPerM',
  lift_line_rating: 'liftLineRatingKg', arbor_empty: 'arborKg', arbor_capacity: 'arborCapacityKg', high_trim: 'highTrimM',
  low_trim: 'lowTrimM', bricks: 'bricks', out_of_service: 'outOfService', notes: 'notes',
};
const PIECE_COLUMN: Record<string, keyof PieceFields> = {
  name: 'name', weight: 'massKg', at: 'positionM', spread_from: 'spreadFromM', spread_to: 'spreadToM', department: 'department', notes: 'notes',
};

/** The text a cell holds for a value. */
function cellOf(column: CsvColumn, value: unknown, units: UnitSystem): string {
  if (value === null || value === undefined) return '';
  switch (column.quantity) {
    case 'length': case 'mass': case 'mass-per-length':
      return formatNumber(toUnits(column.quantity, value as number, units));
    case 'lengths':
      return (value as number[]).map((v) => formatNumber(toUnits('length', v, units))).join(';');
    case 'bricks':
      return Object.entries(value as Record<string, number>).filter(([, n]) => n > 0).sort(([a], [b]) => a.localeCompare(b)).map(([c, n]) => `${c}:${n}`).join(';');
    default:
      return String(value);
  }
}

type LineSetOut = LineSetFields & { outOfService: string | null };

function rowsOf(units: UnitSystem, sets: Array<{ fields: LineSetOut; pieces: PieceFields[] }>): Cells[] {
  const rows: Cells[] = [];
  for (const { fields, pieces } of sets) {
    const row: Cells = {};
    for (const column of CSV_COLUMNS) {
      const field = LINE_SET_COLUMN[column.key];
      row[csvHeader(column, units)] = column.key === 'row' ? 'line set' : field ? cellOf(column, fields[field], units) : '';
    }
    rows.push(row);
    for (const p of pieces) {
      const pr: Cells = {};
      for (const column of CSV_COLUMNS) {
        const field = PIECE_COLUMN[column.key];
        const header = csvHeader(column, units);
        pr[header] = column.key === 'row' ? 'piece' : column.key === 'line_set' ? String(fields.number) : field ? cellOf(column, p[field], units) : '';
      }
      rows.push(pr);
    }
  }
  return rows;
}

interface ParsedLineSet {
  line: number;
  fields: LineSetOut;
  /** Cell text as written, normalised, by column key: what the diff compares. */
  cells: Record<string, string>;
  pieces: Array<{ line: number; fields: PieceFields; cells: Record<string, string> }>;
}

/**
 * The schedule's CSV: export in the venue's units, and an import that is checked whole before
 * anything is written (every row and column error listed), previewed, then applied in one transaction.
 */
export class ScheduleCsv {
  constructor(private readonly db: DataSource, private readonly schedule: ScheduleService, private readonly now: () => number = Date.now) {}

  async export(venueId: number): Promise<{ csv: string; units: UnitSystem; venueName: string }> {
    const venue = await this.schedule.venue(venueId);
    const sets = await this.db.getRepository(LineSetRow).find({ where: { venueId }, order: { number: 'ASC' } });
    const pieces = sets.length
      ? await this.db.getRepository(PieceRow).createQueryBuilder('p').where('p.line_set_id IN (:...ids)', { ids: sets.map((s) => s.id) }).orderBy('p.id').getMany()
      : [];
    const csv = stringify(rowsOf(venue.units, sets.map((s) => ({
      fields: { ...lineSetFieldsOf(s), outOfService: s.outOfService },
      pieces: pieces.filter((p) => p.lineSetId === s.id).map(pieceFieldsOf),
    }))), { header: true, columns: csvHeaders(venue.units) });
    return { csv, units: venue.units, venueName: venue.name };
  }

  /** What the file would change; nothing is written. */
  preview(user: SignedInUser, text: string): Promise<CsvImportResult> {
    return this.db.transaction(async (m) => this.plan(m, user, text, false));
  }

  /** Applies the file as previewed: refused when the schedule changed since (the token differs). */
  import(user: SignedInUser, text: string, token: string): Promise<CsvImportResult> {
    return this.db.transaction(async (m) => {
      const planned = await this.plan(m, user, text, true);
      if (planned.token !== token) {
        throw new HttpError('conflict', 'The schedule changed after the preview (someone saved a line set in it). Nothing was imported: preview the file again.');
      }
      return planned;
    });
  }

  private async plan(m: EntityManager, user: SignedInUser, text: string, apply: boolean): Promise<CsvImportResult> {
    const venue = await this.schedule.venue(user.venueId, m);
    if (!mayEditLineSets(user, venue)) throw forbidden();
    const codes = new Set((await m.getRepository(BrickTypeRow).findBy({ venueId: user.venueId })).map((b) => b.code));
    const { units, sets, errors } = parseScheduleCsv(text, codes);
    const qb = m.getRepository(LineSetRow).createQueryBuilder('l').where('l.venue_id = :venueId', { venueId: user.venueId });
    // Importing locks the venue's line sets: nobody saves one between the check and the write.
    if (apply) qb.setLock('pessimistic_write');
    const existing = await qb.getMany();
    const byNumber = new Map(existing.map((l) => [l.number, l]));
    const pieces = existing.length
      ? await m.getRepository(PieceRow).createQueryBuilder('p').where('p.line_set_id IN (:...ids)', { ids: existing.map((s) => s.id) }).orderBy('p.id').getMany()
      : [];

    const held = await openSessionsByLineSet(m, user.venueId);
    const changes: CsvLineSetChange[] = [];
    const touched: LineSetRow[] = [];
    for (const set of sets) {
      const row = byNumber.get(set.fields.number);
      const before = row ? cellsOfLineSet(row, units) : null;
      const fields = diffCells(before, set.cells, units, 'line set');
      const hung = row ? pieces.filter((p) => p.lineSetId === row.id) : [];
      const pieceChanges: CsvLineSetChange['pieces'] = [];
      const matched = new Set<number>();
      for (const p of set.pieces) {
        const old = hung.find((h) => h.name === p.fields.name && !matched.has(h.id));
        if (old) matched.add(old.id);
        const diff = diffCells(old ? cellsOfPiece(old, units) : null, p.cells, units, 'piece');
        if (!old) pieceChanges.push({ name: p.fields.name, action: 'create', fields: diff });
        else if (diff.length) pieceChanges.push({ name: p.fields.name, action: 'update', fields: diff });
      }
      for (const h of hung) if (!matched.has(h.id)) pieceChanges.push({ name: h.name, action: 'delete', fields: [] });
      const action = !row ? 'create' : fields.length || pieceChanges.length ? 'update' : 'unchanged';
      changes.push({ number: set.fields.number, name: set.fields.name, action, fields, pieces: pieceChanges });
      if (row && action === 'update') {
        touched.push(row);
        const session = held.get(row.id);
        if (session) errors.push({ line: set.line, column: null, message: `Line set ${row.number} is in the open loading session "${session.title}" (session ${session.id}): it cannot be changed until that session is finished or ended.` });
      }
    }
    if (errors.length) throw refusal(errors);

    const token = createHash('sha256').update(JSON.stringify({
      changes, versions: touched.map((r) => [r.id, r.version]), taken: sets.filter((s) => !byNumber.has(s.fields.number)).map((s) => s.fields.number),
    })).digest('hex');
    const counts = {
      created: changes.filter((c) => c.action === 'create').length,
      updated: changes.filter((c) => c.action === 'update').length,
      unchanged: changes.filter((c) => c.action === 'unchanged').length,
      piecesCreated: changes.flatMap((c) => c.pieces).filter((p) => p.action === 'create').length,
      piecesUpdated: changes.flatMap((c) => c.pieces).filter((p) => p.action === 'update').length,
      piecesDeleted: changes.flatMap((c) => c.pieces).filter((p) => p.action === 'delete').length,
    };
    if (apply) await this.write(m, user, sets, byNumber, pieces, units);
    return { units, lineSets: changes, token, counts };
  }

  /**
   * Writes only what differs at the file's precision, so exporting and importing back changes nothing.
   * Batched: new line sets, new pieces and history rows go in multi-row INSERTs, removed pieces in one
   * DELETE; only a changed existing line set or piece is an UPDATE of its own. The history keeps the
   * order of the file (a line set, then its pieces).
   */
  private async write(m: EntityManager, user: SignedInUser, sets: ParsedLineSet[], byNumber: Map<number, LineSetRow>, pieces: PieceRow[], units: UnitSystem): Promise<void> {
    const author = { personId: user.id, personName: user.name, reason: 'CSV import', via: 'CSV import' };
    const venueId = user.venueId;
    const history: ChangeEntry[] = [];
    const added: Array<{ lineSetId: number; fields: PieceFields; entry: ChangeEntry }> = [];
    const addPiece = (lineSetId: number, fields: PieceFields) => {
      // The piece's id is known after the insert: the entry takes its place in the history now.
      const entry: ChangeEntry = { venueId, subject: 'piece', subjectId: null, lineSetId, action: 'create', changes: diffFields(null, fields, PIECE_FIELDS) };
      history.push(entry);
      added.push({ lineSetId, fields, entry });
    };

    const fresh = sets.filter((s) => !byNumber.has(s.fields.number));
    const freshIds = await this.insertLineSets(m, venueId, fresh);
    const removed: number[] = [];
    for (const set of sets) {
      const row = byNumber.get(set.fields.number);
      if (!row) {
        const id = freshIds.get(set.fields.number)!;
        history.push({ venueId, subject: 'line-set', subjectId: id, lineSetId: id, action: 'create', changes: diffFields(null, set.fields, [...LINE_SET_FIELDS, 'outOfService']) });
        for (const p of set.pieces) addPiece(id, p.fields);
        continue;
      }
      const before: LineSetOut = { ...lineSetFieldsOf(row), outOfService: row.outOfService };
      const now = cellsOfLineSet(row, units);
      const after = { ...before };
      for (const [key, field] of Object.entries(LINE_SET_COLUMN)) {
        if (now[key] !== set.cells[key]) (after as Record<string, unknown>)[field] = set.fields[field];
      }
      const hung = pieces.filter((p) => p.lineSetId === row.id);
      const matched = new Set<number>();
      let piecesChanged = false;
      for (const p of set.pieces) {
        const old = hung.find((h) => h.name === p.fields.name && !matched.has(h.id));
        if (!old) { addPiece(row.id, p.fields); piecesChanged = true; continue; }
        matched.add(old.id);
        const was = cellsOfPiece(old, units);
        const next = pieceFieldsOf(old);
        for (const [key, field] of Object.entries(PIECE_COLUMN)) if (was[key] !== p.cells[key]) (next as Record<string, unknown>)[field] = p.fields[field];
        const changes = diffFields(pieceFieldsOf(old), next, PIECE_FIELDS);
        if (Object.keys(changes).length) {
          await m.getRepository(PieceRow).update({ id: old.id }, next);
          history.push({ venueId, subject: 'piece', subjectId: old.id, lineSetId: row.id, action: 'update', changes });
          piecesChanged = true;
        }
      }
      for (const h of hung) {
        if (matched.has(h.id)) continue;
        removed.push(h.id);
        history.push({ venueId, subject: 'piece', subjectId: h.id, lineSetId: row.id, action: 'delete', changes: diffFields(pieceFieldsOf(h), null, PIECE_FIELDS) });
        piecesChanged = true;
      }
      const changes = diffFields(before, after, [...LINE_SET_FIELDS, 'outOfService']);
      if (Object.keys(changes).length || piecesChanged) {
        await m.getRepository(LineSetRow).update({ id: row.id }, { ...after, pipeKg: after.pipeKgPerM * after.pipeLengthM, version: row.version + 1 });
        history.push({ venueId, subject: 'line-set', subjectId: row.id, lineSetId: row.id, action: 'update', changes });
      }
    }
    if (removed.length) await m.getRepository(PieceRow).delete({ id: In(removed) });
    await this.insertPieces(m, added, new Set(pieces.map((p) => p.id)));
    await recordChanges(m, history, author, this.now());
  }

  /** New line sets in multi-row INSERTs; answers their ids by number (read back: (venue, number) is unique). */
  private async insertLineSets(m: EntityManager, venueId: number, sets: ParsedLineSet[]): Promise<Map<number, number>> {
    if (sets.length === 0) return new Map();
    const rows = sets.map(({ fields: { outOfService, ...fields } }) => ({
      venueId, ...fields, pipeKg: fields.pipeKgPerM * fields.pipeLengthM, outOfBalance: false, outOfService, version: 1,
    }));
    for (let i = 0; i < rows.length; i += ROWS_PER_INSERT) {
      await m.createQueryBuilder().insert().into(LineSetRow).values(rows.slice(i, i + ROWS_PER_INSERT)).updateEntity(false).execute();
    }
    const ids = await m.getRepository(LineSetRow).find({ select: { id: true, number: true }, where: { venueId, number: In(sets.map((s) => s.fields.number)) } });
    return new Map(ids.map((r) => [r.number, r.id]));
  }

  /**
   * New pieces in multi-row INSERTs, then their ids read back into their history entries: a new piece
   * is one of those line sets' pieces that was not there before, known by its name (unique on its set in a file).
   */
  private async insertPieces(m: EntityManager, added: Array<{ lineSetId: number; fields: PieceFields; entry: ChangeEntry }>, before: Set<number>): Promise<void> {
    if (added.length === 0) return;
    const rows = added.map((a) => ({ lineSetId: a.lineSetId, ...a.fields }));
    for (let i = 0; i < rows.length; i += ROWS_PER_INSERT) {
      await m.createQueryBuilder().insert().into(PieceRow).values(rows.slice(i, i + ROWS_PER_INSERT)).updateEntity(false).execute();
    }
    const lineSetIds = [...new Set(added.map((a) => a.lineSetId))];
    const now = await m.getRepository(PieceRow).find({ select: { id: true, lineSetId: true, name: true }, where: { lineSetId: In(lineSetIds) } });
    const idOf = new Map(now.filter((p) => !before.has(p.id)).map((p) => [`${p.lineSetId}\u0000${p.name}`, p.id]));
    for (const a of added) a.entry.subjectId = idOf.get(`${a.lineSetId}\u0000${a.fields.name}`) ?? null;
  }
}

function cellsOfLineSet(row: LineSetRow, units: UnitSystem): Record<string, string> {
  const out: Record<string, string> = {};
  const fields: LineSetOut = { ...lineSetFieldsOf(row), outOfService: row.outOfService };
  for (const [key, field] of Object.entries(LINE_SET_COLUMN)) out[key] = cellOf(COLUMN[key], fields[field], units);
  return out;
}
function cellsOfPiece(row: PieceRow, units: UnitSystem): Record<string, string> {
  const out: Record<string, string> = {};
  const fields = pieceFieldsOf(row);
  for (const [key, field] of Object.entries(PIECE_COLUMN)) out[key] = cellOf(COLUMN[key], fields[field], units);
  return out;
}

function diffCells(before: Record<string, string> | null, after: Record<string, string>, units: UnitSystem, kind: 'line set' | 'piece'): CsvFieldChange[] {
  const keys = Object.keys(kind === 'line set' ? LINE_SET_COLUMN : PIECE_COLUMN);
  return keys.filter((k) => (before?.[k] ?? '') !== after[k] && !(before === null && after[k] === ''))
    .map((k) => ({ column: csvHeader(COLUMN[k], units), old: before?.[k] ?? '', new: after[k] }));
}

function refusal(errors: CsvRowError[]): HttpError {
  const fields: Record<string, string[]> = {};
  for (const e of errors) (fields[`line ${e.line}${e.column ? `: ${e.column}` : ''}`] ??= []).push(e.message);
  const list = errors.slice(0, 20).map((e) => `Line ${e.line}${e.column ? `, ${e.column}` : ''}: ${e.message}`).join(' ');
  return new HttpError('bad-input', `The file was not imported: ${errors.length} ${errors.length === 1 ? 'problem' : 'problems'}. ${list}${errors.length > 20 ? ' …' : ''}`, fields);
}

/**
 * Reads a schedule CSV (csv-parse) and checks every row with the same schemas as the forms.
 * The unit system comes from the headers. Every problem is collected: the caller refuses the whole file.
 */
export function parseScheduleCsv(text: string, brickCodes: Set<string>): { units: UnitSystem; sets: ParsedLineSet[]; errors: CsvRowError[] } {
  const errors: CsvRowError[] = [];
  let records: string[][];
  try {
    records = parse(text, { bom: true, skip_empty_lines: true, relax_column_count: true, trim: true });
  } catch (error) {
    const e = error as { lines?: number; message: string };
    throw refusal([{ line: e.lines ?? 1, column: null, message: `Not a readable CSV file: ${e.message}` }]);
  }
  if (records.length === 0) throw refusal([{ line: 1, column: null, message: 'The file is empty: it needs the header row and at least one line set.' }]);
  const header = records[0];
  const units: UnitSystem = header.includes('batten_length_m') ? 'metric' : 'imperial';
  const expected = csvHeaders(units);
  const missing = expected.filter((h) => !header.includes(h));
  if (missing.length) {
    throw refusal([{ line: 1, column: null, message: `The header lacks ${missing.join(', ')}. Export the schedule to see the columns (the README lists them).` }]);
  }
  const index = Object.fromEntries(CSV_COLUMNS.map((c) => [c.key, header.indexOf(csvHeader(c, units))]));
  const sets: ParsedLineSet[] = [];

  records.slice(1).forEach((record, i) => {
    const line = i + 2;
    const raw = (key: string) => (record[index[key]] ?? '').trim();
    const rowErrors: CsvRowError[] = [];
    const bad = (key: string, message: string) => rowErrors.push({ line, column: csvHeader(COLUMN[key], units), message });
    const number = (key: string, required: boolean): number | null => {
      const text = raw(key);
      if (text === '') { if (required) bad(key, 'Needs a number'); return null; }
      const v = Number(text);
      if (!Number.isFinite(v)) { bad(key, `"${text}" is not a number`); return null; }
      return fromUnits(COLUMN[key].quantity, v, units);
    };
    const kind = raw('row').toLowerCase();
    const lineSetNumber = Number(raw('line_set'));
    if (!Number.isInteger(lineSetNumber) || lineSetNumber < 1) bad('line_set', `"${raw('line_set')}" is not a line set number`);

    if (kind === 'line set') {
      const lifts = raw('lift_lines') === '' ? [] : raw('lift_lines').split(';').map((s) => s.trim());
      const liftLinesM = lifts.map((s) => Number(s));
      if (liftLinesM.some((v) => !Number.isFinite(v))) bad('lift_lines', `"${raw('lift_lines')}" is not a list of positions separated by ";"`);
      const bricks: Record<string, number> = {};
      for (const part of raw('bricks') === '' ? [] : raw('bricks').split(';')) {
        const m = /^\s*([a-z0-9-]+)\s*:\s*(\d+)\s*$/.exec(part);
        if (!m) { bad('bricks', `"${part}" is not a brick count like full:6`); continue; }
        if (!brickCodes.has(m[1])) bad('bricks', `No brick type "${m[1]}" at this venue`);
        bricks[m[1]] = Number(m[2]);
      }
      const candidate = {
        number: lineSetNumber, name: raw('name'), distanceM: number('distance_from_plaster_line', false), purchase: Number(raw('purchase')),
        pipeSize: raw('pipe'), pipeKgPerM: number('pipe_weight', true), pipeLengthM: number('batten_length', true),
        liftLinesM: liftLinesM.map((v) => fromUnits('length', v, units)), liftLineRatingKg: number('lift_line_rating', true),
        battenRatingKgPerM: number('batten_rating', true), arborKg: number('arbor_empty', true), arborCapacityKg: number('arbor_capacity', true),
        highTrimM: number('high_trim', false), lowTrimM: number('low_trim', false), notes: raw('notes'), bricks,
      };
      const parsed = lineSetFieldsSchema.safeParse(candidate);
      if (!parsed.success && rowErrors.length === 0) {
        for (const issue of parsed.error.issues) {
          const field = String(issue.path[0]);
          const key = Object.entries(LINE_SET_COLUMN).find(([, f]) => f === field)?.[0];
          rowErrors.push({ line, column: key ? csvHeader(COLUMN[key], units) : null, message: issue.message });
        }
      }
      if (sets.some((s) => s.fields.number === lineSetNumber)) bad('line_set', `Line set ${lineSetNumber} appears twice`);
      errors.push(...rowErrors);
      if (parsed.success && rowErrors.length === 0) {
        const fields = { ...parsed.data, outOfService: raw('out_of_service') || null };
        const cells: Record<string, string> = {};
        for (const [key, field] of Object.entries(LINE_SET_COLUMN)) cells[key] = cellOf(COLUMN[key], fields[field], units);
        sets.push({ line, fields, cells, pieces: [] });
      } else {
        // Keep the number so its pieces are not also reported as orphans.
        sets.push({ line, fields: { number: lineSetNumber } as LineSetOut, cells: {}, pieces: [] });
      }
    } else if (kind === 'piece') {
      const candidate = {
        name: raw('name'), massKg: number('weight', true), positionM: number('at', false), spreadFromM: number('spread_from', false),
        spreadToM: number('spread_to', false), department: raw('department'), notes: raw('notes'),
      };
      const parsed = pieceFieldsSchema.safeParse(candidate);
      if (!parsed.success && rowErrors.length === 0) {
        for (const issue of parsed.error.issues) {
          const field = String(issue.path[0]);
          const key = Object.entries(PIECE_COLUMN).find(([, f]) => f === field)?.[0];
          rowErrors.push({ line, column: key ? csvHeader(COLUMN[key], units) : null, message: issue.message });
        }
      }
      const owner = sets.find((s) => s.fields.number === lineSetNumber);
      if (!owner) bad('line_set', `Line set ${raw('line_set')} has no line set row above this piece`);
      if (parsed.success && owner?.fields.pipeLengthM !== undefined) {
        for (const [key, field] of [['at', 'positionM'], ['spread_from', 'spreadFromM'], ['spread_to', 'spreadToM']] as const) {
          const v = parsed.data[field];
          if (v !== null && v > owner.fields.pipeLengthM + 1e-9) bad(key, 'Past the end of the batten');
        }
        if (owner.pieces.some((p) => p.fields.name === parsed.data.name)) bad('name', `Two pieces named "${parsed.data.name}" on line set ${lineSetNumber}`);
      }
      errors.push(...rowErrors);
      if (parsed.success && owner && rowErrors.length === 0) {
        const cells: Record<string, string> = {};
        for (const [key, field] of Object.entries(PIECE_COLUMN)) cells[key] = cellOf(COLUMN[key], parsed.data[field], units);
        owner.pieces.push({ line, fields: parsed.data, cells });
      }
    } else {
      bad('row', `"${raw('row')}" is neither "line set" nor "piece"`);
      errors.push(...rowErrors);
    }
  });
  return { units, sets: sets.filter((s) => s.fields.pipeLengthM !== undefined), errors };
}
