import { z } from 'zod';
import {
  bricksMassKg,
  checkLineSet,
  liftLineShares,
  DEFAULT_MAX_SPAN_M,
  DEFAULT_SPREADER_SPACING_M,
  KG_PER_LB,
  M_PER_FT,
  M_PER_IN,
  STEEL_DENSITY_KG_M3,
  type BrickCounts,
  type BrickType,
  type LiftLineHang,
  type PlanWarning,
  type Purchase,
} from '../rigging';
import { UNIT_SYSTEMS, type UnitSystem } from './people';
import { timeZoneSchema } from './time-zone';

/** Where every position along a batten is measured from: said on every screen and in the CSV. */
export const POSITION_ORIGIN = 'measured from the stage-left end of the batten';

/** The caution crew see on the schedule and the planner until the director writes the venue's own. */
export const DEFAULT_CAUTION =
  'Railcall computes weights and capacities as a planning aid. The venue\'s ratings, its own procedures and a qualified rigger decide; counterweight is the last thing loaded and the first unloaded.';

/** Settings a technical director tunes per venue. Defaults: common practice. */
export interface VenueSettingsView {
  /** Out-of-balance a rope lock holds, at the batten. Default 50 lb. */
  ropeLockLimitKg: number;
  /** Seconds before a silent crew member is alerted again after a call. */
  reAlertSeconds: number;
  /** Fewest people per role before loading may begin without a recorded reason. */
  minCrew: { rail: number; loader: number; deck: number };
  /** Longest batten span between lift lines. Default 10 ft. */
  maxSpanM: number;
  /** Stack height between spreader plates. Default 24 in. */
  spreaderPlateEveryM: number;
  /** The caution shown to crew on the schedule and the planner. */
  caution: string;
  /** The director lets rail operators edit line sets too (pieces they may always edit). */
  railEditsLineSets: boolean;
  /** The venue's IANA time zone: reports, history and log times are shown in it. */
  timeZone: string;
}

export const DEFAULT_SETTINGS: VenueSettingsView = {
  ropeLockLimitKg: 50 * KG_PER_LB,
  reAlertSeconds: 20,
  minCrew: { rail: 1, loader: 2, deck: 1 },
  maxSpanM: DEFAULT_MAX_SPAN_M,
  spreaderPlateEveryM: DEFAULT_SPREADER_SPACING_M,
  caution: DEFAULT_CAUTION,
  railEditsLineSets: false,
  timeZone: 'UTC',
};

/** Settings as stored, filled with the defaults for anything a venue saved before it existed. */
export function withDefaultSettings(stored: Partial<VenueSettingsView> | null | undefined): VenueSettingsView {
  return { ...DEFAULT_SETTINGS, ...(stored ?? {}), minCrew: { ...DEFAULT_SETTINGS.minCrew, ...(stored?.minCrew ?? {}) } };
}

export interface VenueView {
  id: number;
  name: string;
  units: UnitSystem;
  settings: VenueSettingsView;
}

export interface PieceView {
  id: number;
  name: string;
  massKg: number;
  /** At one point: its centre, m along the batten (see POSITION_ORIGIN). */
  positionM: number | null;
  /** Spread from-to along the batten; both null with no point means spread along the whole batten. */
  spreadFromM: number | null;
  spreadToM: number | null;
  department: string;
  notes: string;
}

/** What Railcall computes for a line set from its schedule entry. Planning aid only. */
export interface LineSetComputed {
  battenSideKg: number;
  arborSideKg: number;
  /** At the batten: batten side − arbor side ÷ purchase. Positive = pipe-heavy. */
  imbalanceKg: number;
  /** Beyond the venue's rope-lock limit either way. */
  outOfBalance: boolean;
  overCapacity: boolean;
  /** Every capacity warning of shared/rigging's checkLineSet. */
  warnings: PlanWarning[];
  /** What each lift line carries (slack lines carry nothing), or that the batten tips; null when it cannot be solved. */
  liftLines: LiftLineHang | null;
}

/** One line set of the schedule as the client sees it. Lengths in m, masses in kg. */
export interface LineSetView {
  id: number;
  number: number;
  name: string;
  /** Distance from the plaster line, upstage, m. */
  distanceM: number | null;
  purchase: Purchase;
  /** Pipe from the table ("1-1/2 in Schedule 40"), or "" for a weight per length given by hand. */
  pipeSize: string;
  pipeKgPerM: number;
  pipeLengthM: number;
  /** Pipe self-weight: pipeKgPerM × pipeLengthM. */
  pipeKg: number;
  liftLinesM: number[];
  liftLineRatingKg: number;
  battenRatingKgPerM: number;
  arborKg: number;
  arborCapacityKg: number;
  highTrimM: number | null;
  lowTrimM: number | null;
  notes: string;
  bricks: BrickCounts;
  /** The last test of balance at the rail found it out of balance. */
  outOfBalance: boolean;
  /** Null when in service; else why it is out. */
  outOfService: string | null;
  /** The open loading session working this set, if any: nobody plans on it or edits it until that one ends. */
  openSession: { id: number; title: string } | null;
  /** Goes up with every change to the set or its pieces; a save names the version it started from. */
  version: number;
  pieces: PieceView[];
  computed: LineSetComputed;
}

export interface BrickTypeView {
  id: number;
  code: string;
  name: string;
  massKg: number;
  heightM: number | null;
  widthM: number | null;
  depthM: number | null;
  /** Bricks of this type waiting on the loading bridge. */
  bridgeCount: number;
}

/** `GET /api/schedule`. */
export interface ScheduleView {
  venue: VenueView;
  lineSets: LineSetView[];
  brickTypes: BrickTypeView[];
}

// ---------------------------------------------------------------------------------------------
// Computations shared by the schedule screen (live, while typing) and the server (GET /schedule).

/** The brick types in the shape shared/rigging reads. */
export function rigBrickTypes(brickTypes: Pick<BrickTypeView, 'code' | 'massKg' | 'heightM'>[]): BrickType[] {
  return brickTypes.map((b) => ({ type: b.code, massKg: b.massKg, ...(b.heightM ? { heightM: b.heightM } : {}) }));
}

/** Where a piece's weight sits, in the shape of shared/rigging's beam loads. */
export function pieceLoads(pieces: Pick<PieceView, 'massKg' | 'positionM' | 'spreadFromM' | 'spreadToM'>[], pipeLengthM: number) {
  const pointLoads = pieces.filter((p) => p.positionM !== null).map((p) => ({ atM: p.positionM!, massKg: p.massKg }));
  const spreadLoads = pieces.filter((p) => p.positionM === null).map((p) => ({
    fromM: p.spreadFromM ?? 0,
    toM: p.spreadToM ?? pipeLengthM,
    massKg: p.massKg,
  }));
  return { pointLoads, spreadLoads };
}

type ComputeInput = Omit<LineSetView, 'id' | 'version' | 'computed' | 'outOfBalance' | 'openSession' | 'pieces'> & {
  pieces: Pick<PieceView, 'massKg' | 'positionM' | 'spreadFromM' | 'spreadToM'>[];
};

/** Balance and every capacity warning of a line set as the schedule has it. */
export function computeLineSet(ls: ComputeInput, venue: Pick<VenueView, 'units' | 'settings'>, brickTypes: BrickType[]): LineSetComputed {
  const hungKg = ls.pieces.reduce((sum, p) => sum + p.massKg, 0);
  const battenSideKg = ls.pipeKg + hungKg;
  const known = Object.fromEntries(Object.entries(ls.bricks).filter(([code]) => brickTypes.some((b) => b.type === code)));
  const arborSideKg = ls.arborKg + bricksMassKg(known, brickTypes);
  const imbalanceKg = battenSideKg - arborSideKg / ls.purchase;
  const warnings: PlanWarning[] = [];
  let liftLines: LiftLineHang | null = null;
  try {
    liftLines = liftLineShares({ lengthM: ls.pipeLengthM, liftLines: ls.liftLinesM.map((atM) => ({ atM, ratedKg: ls.liftLineRatingKg })), pipeKgPerM: ls.pipeKgPerM, ...pieceLoads(ls.pieces, ls.pipeLengthM) });
    warnings.push(...checkLineSet({
      lengthM: ls.pipeLengthM,
      liftLines: ls.liftLinesM.map((atM) => ({ atM, ratedKg: ls.liftLineRatingKg })),
      pipeKgPerM: ls.pipeKgPerM,
      ...pieceLoads(ls.pieces, ls.pipeLengthM),
      battenRatedKgPerM: ls.battenRatingKgPerM,
      purchase: ls.purchase,
      arborKg: ls.arborKg,
      bricks: known,
      brickTypes,
      arborCapacityKg: ls.arborCapacityKg,
      maxSpanM: venue.settings.maxSpanM,
      spreaderSpacingM: venue.settings.spreaderPlateEveryM,
      units: venue.units,
    }));
  } catch (error) {
    // A geometry the beam cannot solve (lift lines off the batten...) is itself a warning, not a crash.
    warnings.push({ severity: 'error', code: 'geometry', message: (error as Error).message });
  }
  const unknown = Object.keys(ls.bricks).filter((code) => ls.bricks[code] && !brickTypes.some((b) => b.type === code));
  if (unknown.length) warnings.push({ severity: 'error', code: 'unknown-brick', message: `Bricks of an unknown type on the arbor: ${unknown.join(', ')}.` });
  const overCapacity = warnings.some((w) => ['arbor-over-capacity', 'batten-over-total', 'batten-over-per-length', 'lift-line-over', 'batten-tips'].includes(w.code));
  return {
    battenSideKg,
    arborSideKg,
    imbalanceKg,
    outOfBalance: Math.abs(imbalanceKg) > venue.settings.ropeLockLimitKg + 1e-9,
    overCapacity,
    warnings,
    liftLines,
  };
}

/** A brick's weight from its size and the steel density (0.2836 lb/in³ = 7850 kg/m³; engineering handbooks). */
export function brickMassFromSizeKg(widthM: number, depthM: number, heightM: number, densityKgM3 = STEEL_DENSITY_KG_M3): number {
  return widthM * depthM * heightM * densityKgM3;
}

// ---------------------------------------------------------------------------------------------
// Input schemas: the same ones validate the forms and the routes.

const reason = z.string().trim().max(300);
const name = z.string().trim().min(1, 'Enter a name').max(80);
const lengthM = z.number({ error: 'Enter a length' }).finite().min(0, 'A length cannot be negative').max(200, 'Longer than any batten');
const massKg = z.number({ error: 'Enter a weight' }).finite().min(0, 'A weight cannot be negative').max(20000, 'Heavier than any line set carries');
const brickCounts = z.record(z.string().min(1).max(40), z.number().int('Whole bricks only').min(0, 'No fewer than 0 bricks').max(999));

export const venueSettingsSchema = z.object({
  ropeLockLimitKg: massKg.refine((v) => v > 0, 'Give a limit above zero'),
  reAlertSeconds: z.number().int('Whole seconds').min(5, 'At least 5 seconds').max(600, 'At most 10 minutes'),
  minCrew: z.object({
    rail: z.number().int().min(1, 'At least one rail operator').max(10),
    loader: z.number().int().min(0).max(10),
    deck: z.number().int().min(0).max(10),
  }),
  maxSpanM: lengthM.refine((v) => v > 0, 'Give a spacing above zero'),
  spreaderPlateEveryM: lengthM.refine((v) => v > 0, 'Give a spacing above zero'),
  caution: z.string().trim().min(1, 'Write the caution crew will see').max(600),
  railEditsLineSets: z.boolean(),
  timeZone: timeZoneSchema,
});

/** `PUT /api/venue`. */
export const venueInputSchema = z.object({
  name: z.string().trim().min(1, 'Enter the venue\'s name').max(120),
  units: z.enum(UNIT_SYSTEMS, { error: 'Choose imperial or metric' }),
  settings: venueSettingsSchema,
  reason: reason.optional(),
});
export type VenueInput = z.infer<typeof venueInputSchema>;

const optionalLength = lengthM.nullable();

/** The editable fields of a line set (`POST /api/line-sets`, and `PUT` with `version`). */
export const lineSetFieldsSchema = z.object({
  number: z.number({ error: 'Enter a number' }).int('A whole number').min(1, 'Numbers start at 1').max(999),
  name,
  distanceM: optionalLength,
  purchase: z.union([z.literal(1), z.literal(2)], { error: 'Single (1) or double (2) purchase' }),
  pipeSize: z.string().trim().max(40),
  pipeKgPerM: z.number({ error: 'Enter the pipe weight per length' }).finite().positive('Give a weight above zero').max(100),
  pipeLengthM: lengthM.refine((v) => v > 0, 'Give a length above zero'),
  liftLinesM: z.array(lengthM).min(2, 'A batten hangs from at least two lift lines').max(12),
  liftLineRatingKg: massKg.refine((v) => v > 0, 'Give a rating above zero'),
  battenRatingKgPerM: z.number({ error: 'Enter the batten rating' }).finite().positive('Give a rating above zero').max(1000),
  arborKg: massKg,
  arborCapacityKg: massKg.refine((v) => v > 0, 'Give a capacity above zero'),
  highTrimM: optionalLength,
  lowTrimM: optionalLength,
  notes: z.string().trim().max(1000),
  bricks: brickCounts,
}).superRefine((ls, ctx) => {
  ls.liftLinesM.forEach((atM, i) => {
    if (atM > ls.pipeLengthM + 1e-9) ctx.addIssue({ code: 'custom', path: ['liftLinesM', i], message: 'A lift line must be on the batten (within its length)' });
  });
  if (new Set(ls.liftLinesM).size !== ls.liftLinesM.length) ctx.addIssue({ code: 'custom', path: ['liftLinesM'], message: 'Two lift lines cannot pick up the same point' });
  if (ls.arborKg > ls.arborCapacityKg) ctx.addIssue({ code: 'custom', path: ['arborKg'], message: 'The empty arbor is heavier than its capacity' });
  if (ls.highTrimM !== null && ls.lowTrimM !== null && ls.lowTrimM > ls.highTrimM) {
    ctx.addIssue({ code: 'custom', path: ['lowTrimM'], message: 'The low trim is above the high trim' });
  }
});
export type LineSetFields = z.infer<typeof lineSetFieldsSchema>;

const version = z.number({ error: 'Which version was edited?' }).int().min(1);

export const createLineSetSchema = z.object({ lineSet: lineSetFieldsSchema, reason: reason.optional() });
export const updateLineSetSchema = z.object({ lineSet: lineSetFieldsSchema, version, reason: reason.optional() });
export const deleteLineSetSchema = z.object({ version, reason: reason.optional() });
export const lineSetServiceSchema = z.object({
  version,
  inService: z.boolean(),
  reason: reason.optional(),
}).refine((s) => s.inService || (s.reason?.length ?? 0) > 0, { path: ['reason'], message: 'Say why the line set is out of service' });

/** A piece: at a point, spread from-to, or (neither) spread along the whole batten. */
export const pieceFieldsSchema = z.object({
  name,
  massKg: massKg.refine((v) => v > 0, 'Give a weight above zero'),
  positionM: optionalLength,
  spreadFromM: optionalLength,
  spreadToM: optionalLength,
  department: z.string().trim().max(40),
  notes: z.string().trim().max(500),
}).superRefine((p, ctx) => {
  const spread = p.spreadFromM !== null || p.spreadToM !== null;
  if (p.positionM !== null && spread) ctx.addIssue({ code: 'custom', path: ['positionM'], message: 'A piece hangs at a point or spread, not both' });
  if (spread && (p.spreadFromM === null || p.spreadToM === null)) {
    ctx.addIssue({ code: 'custom', path: [p.spreadFromM === null ? 'spreadFromM' : 'spreadToM'], message: 'Give both ends of the spread' });
  }
  if (p.spreadFromM !== null && p.spreadToM !== null && p.spreadToM < p.spreadFromM) {
    ctx.addIssue({ code: 'custom', path: ['spreadToM'], message: 'The spread must end after it starts' });
  }
});
export type PieceFields = z.infer<typeof pieceFieldsSchema>;

/** Pieces carry the version of their line set: any edit of the set or its pieces is one sequence. */
export const pieceInputSchema = z.object({ piece: pieceFieldsSchema, version, reason: reason.optional() });
export const pieceDeleteSchema = z.object({ version, reason: reason.optional() });

export const brickTypeFieldsSchema = z.object({
  code: z.string().trim().min(1, 'Give a short code').max(40).regex(/^[a-z0-9-]+$/, 'Lower-case letters, digits and dashes'),
  name,
  massKg: massKg.refine((v) => v > 0, 'Give a weight above zero'),
  heightM: optionalLength,
  widthM: optionalLength,
  depthM: optionalLength,
});
export type BrickTypeFields = z.infer<typeof brickTypeFieldsSchema>;
export const brickTypeInputSchema = z.object({ brickType: brickTypeFieldsSchema, reason: reason.optional() });
export const bridgeStockSchema = z.object({
  bridgeCount: z.number({ error: 'Enter a count' }).int('Whole bricks only').min(0, 'No fewer than 0 bricks').max(100000),
  reason: z.string().trim().min(1, 'Say why the count is corrected').max(300),
});
export const deleteWithReasonSchema = z.object({ reason: reason.optional() });

// ---------------------------------------------------------------------------------------------
// History

export const HISTORY_SUBJECTS = ['venue', 'line-set', 'piece', 'brick-type', 'bridge-stock'] as const;
export type HistorySubject = (typeof HISTORY_SUBJECTS)[number];

/** One kept change: every field that changed, old and new, who, when, why, and the session if one wrote it. */
export interface HistoryEntry {
  id: number;
  atMs: number;
  subject: HistorySubject;
  subjectId: number | null;
  lineSetId: number | null;
  action: 'create' | 'update' | 'delete';
  /** field -> [old, new]; a create has old null, a delete new null. */
  changes: Record<string, [unknown, unknown]>;
  personName: string;
  reason: string;
  sessionId: number | null;
  sessionTitle: string | null;
  /** e.g. "CSV import". */
  via: string | null;
}

/** `GET /api/line-sets/:id/history`. */
export interface LineSetHistory {
  entries: HistoryEntry[];
  /** Loading sessions that wrote to this line set, newest first. */
  sessions: { id: number; title: string; phase: string; createdAtMs: number }[];
}

/** The conflict answer names who saved first; the client keeps what was typed. */
export interface EditConflict {
  changedBy: string;
  changedAtMs: number;
  version: number;
}

export { M_PER_FT, M_PER_IN, KG_PER_LB };
