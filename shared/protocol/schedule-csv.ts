/**
 * The schedule as one CSV file: a row per line set, each followed by a row per piece on it.
 * Numbers are in the venue's units, named in the header (`_ft`, `_lb`...), so a file says what it holds.
 * Positions along the batten are measured from its stage-left end.
 */
import type { UnitSystem } from './people';

export type CsvQuantity = 'length' | 'mass' | 'mass-per-length' | 'lengths' | 'count' | 'text' | 'kind' | 'bricks';

export interface CsvColumn {
  /** Header without the unit suffix. */
  key: string;
  quantity: CsvQuantity;
  /** Which rows use it. */
  rows: 'line set' | 'piece' | 'both';
  /** For the README and the screen. */
  says: string;
}

export const CSV_COLUMNS: readonly CsvColumn[] = [
  { key: 'row', quantity: 'kind', rows: 'both', says: '"line set" or "piece" (a piece belongs to the line set of its line_set number)' },
  { key: 'line_set', quantity: 'count', rows: 'both', says: 'line set number' },
  { key: 'name', quantity: 'text', rows: 'both', says: 'name or use of the line set; name of the piece' },
  { key: 'distance_from_plaster_line', quantity: 'length', rows: 'line set', says: 'upstage of the plaster line (empty if unknown)' },
  { key: 'purchase', quantity: 'count', rows: 'line set', says: '1 = single, 2 = double purchase' },
  { key: 'pipe', quantity: 'text', rows: 'line set', says: 'pipe size from the pipe table, e.g. "1-1/2 in Schedule 40" (empty when the weight is given by hand)' },
  { key: 'pipe_weight', quantity: 'mass-per-length', rows: 'line set', says: 'pipe self-weight per length' },
  { key: 'batten_length', quantity: 'length', rows: 'line set', says: 'length of the batten pipe' },
  { key: 'lift_lines', quantity: 'lengths', rows: 'line set', says: 'lift line positions from the stage-left end, separated by ";"' },
  { key: 'batten_rating', quantity: 'mass-per-length', rows: 'line set', says: 'rated distributed load of the batten' },
  { key: 'lift_line_rating', quantity: 'mass', rows: 'line set', says: 'rated load of each lift line' },
  { key: 'arbor_empty', quantity: 'mass', rows: 'line set', says: 'empty arbor weight' },
  { key: 'arbor_capacity', quantity: 'mass', rows: 'line set', says: 'most the arbor may carry, empty arbor included' },
  { key: 'high_trim', quantity: 'length', rows: 'line set', says: 'high trim above the stage floor (empty if none)' },
  { key: 'low_trim', quantity: 'length', rows: 'line set', says: 'low trim above the stage floor (empty if none)' },
  { key: 'bricks', quantity: 'bricks', rows: 'line set', says: 'bricks on the arbor by brick type code, e.g. "full:6;half:1"' },
  { key: 'out_of_service', quantity: 'text', rows: 'line set', says: 'why the set is out of service; empty when in service' },
  { key: 'weight', quantity: 'mass', rows: 'piece', says: 'weight of the piece' },
  { key: 'at', quantity: 'length', rows: 'piece', says: 'a piece at a point: its centre from the stage-left end' },
  { key: 'spread_from', quantity: 'length', rows: 'piece', says: 'a spread piece: where it starts from the stage-left end' },
  { key: 'spread_to', quantity: 'length', rows: 'piece', says: 'a spread piece: where it ends (at, from and to all empty = spread along the whole batten)' },
  { key: 'department', quantity: 'text', rows: 'piece', says: 'who owns the piece (soft goods, lighting...)' },
  { key: 'notes', quantity: 'text', rows: 'both', says: 'notes on the line set or the piece' },
];

const SUFFIX: Record<UnitSystem, Partial<Record<CsvQuantity, string>>> = {
  imperial: { length: '_ft', lengths: '_ft', mass: '_lb', 'mass-per-length': '_lb_per_ft' },
  metric: { length: '_m', lengths: '_m', mass: '_kg', 'mass-per-length': '_kg_per_m' },
};

/** The header of a column in a unit system: `batten_length_ft`, `weight_kg`, `name`. */
export const csvHeader = (column: CsvColumn, units: UnitSystem) => `${column.key}${SUFFIX[units][column.quantity] ?? ''}`;
export const csvHeaders = (units: UnitSystem) => CSV_COLUMNS.map((c) => csvHeader(c, units));

/** One changed field in an import preview, old and new as the file writes them. */
export interface CsvFieldChange {
  column: string;
  old: string;
  new: string;
}

export interface CsvPieceChange {
  name: string;
  action: 'create' | 'update' | 'delete';
  fields: CsvFieldChange[];
}

export interface CsvLineSetChange {
  number: number;
  name: string;
  action: 'create' | 'update' | 'unchanged';
  fields: CsvFieldChange[];
  pieces: CsvPieceChange[];
}

/** What an import would do (`POST /api/schedule/csv/preview`) or did (`.../import`). */
export interface CsvImportResult {
  units: UnitSystem;
  lineSets: CsvLineSetChange[];
  /** Hand it back to import exactly what was previewed; a changed schedule is refused (409). */
  token: string;
  counts: { created: number; updated: number; unchanged: number; piecesCreated: number; piecesUpdated: number; piecesDeleted: number };
}

/** A file refused whole: every problem, by row (the header is line 1) and column. */
export interface CsvRowError {
  line: number;
  column: string | null;
  message: string;
}
