/**
 * The shapes every rigging computation speaks. Units are SI throughout: kilograms and metres.
 * Shown to people in the venue's own units (see units.ts); never stored in anything else.
 */

/** 1 = single purchase (arbor balances 1:1); 2 = double purchase (arbor carries twice, travels half). */
export type Purchase = 1 | 2;

/** How a venue sees masses and lengths: pounds and feet-inches, or kilograms and metres. */
export type Units = 'imperial' | 'metric';

/** A venue's brick type, e.g. a full and a half brick of the same footprint. */
export interface BrickType {
  type: string;
  massKg: number;
  /** Stack height of one brick, for the spreader-plate check. Optional. */
  heightM?: number;
}

/** Bricks counted by type: `{ full: 6, half: 2 }`. Missing types count as zero. */
export type BrickCounts = Record<string, number>;

/** Something hung on a batten: a drape, a truss, a light bar. */
export interface Piece {
  id: string;
  massKg: number;
}

/** What a line set carries right now: the batten side and the arbor side. */
export interface LineSetLoad {
  purchase: Purchase;
  /** Self-weight of the batten pipe (plus anything permanently on it). */
  pipeKg: number;
  /** Empty arbor: rods, plates, the carriage. */
  arborKg: number;
  pieces: Piece[];
  /** Bricks on the arbor now. */
  bricks: BrickCounts;
}

export type StepKind =
  | 'remove-bricks'
  | 'add-bricks'
  | 'remove-piece'
  | 'add-piece'
  | 'tie-off'
  | 'untie'
  | 'test-balance';

/** One step of a plan, with the balance it leaves (kg at the batten; positive = pipe-heavy). */
export interface PlanStep {
  kind: StepKind;
  /** On remove-piece / add-piece; on a brick step, the piece those bricks balance (none on a final trim). */
  pieceId?: string;
  /** On add-piece: the piece's mass, so the step can be applied on its own. */
  massKg?: number;
  /** On remove-bricks / add-bricks. */
  bricks?: BrickCounts;
  /**
   * On a brick step that passes a spreader plate: the counts within the step after which a plate goes on
   * (loading) or comes off (unloading), in the order the bricks are handled (see spreader.ts). Absent
   * when the step passes none or a brick height is unknown.
   */
  spreaderPlatesAt?: number[];
  imbalanceAfterKg: number;
}

export interface PlanInput extends LineSetLoad {
  brickTypes: BrickType[];
  /** Bricks waiting on the loading bridge, available to load. */
  bridgeStock: BrickCounts;
  /** Ids of pieces to take off the batten. */
  remove: string[];
  /** Pieces to hang. */
  add: Piece[];
  /** Out-of-balance the rope lock can hold (kg at the batten); beyond it the set is tied off. */
  ropeLockLimitKg: number;
  /** Most the arbor can carry in bricks + empty arbor, if known. */
  arborCapacityKg?: number;
  /** Units for the numbers in warnings; metric when not given. */
  units?: Units;
  /** Stack height between spreader plates; when given (and brick heights are known), brick steps say where plates go. */
  spreaderSpacingM?: number;
}

/** A message a person can read; `error` means the plan must not be run. */
export interface PlanWarning {
  severity: 'error' | 'warning';
  code: string;
  message: string;
}

export interface PlanResult {
  steps: PlanStep[];
  /** The line set after the last step, in the input's shape. */
  final: PlanInput;
  warnings: PlanWarning[];
}
