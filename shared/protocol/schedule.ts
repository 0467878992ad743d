import type { BrickCounts, Purchase } from '../rigging/types';
import type { UnitSystem } from './people';

export interface VenueSettingsView {
  ropeLockLimitKg: number;
  reAlertSeconds: number;
  minCrew: { rail: number; loader: number; deck: number };
  maxSpanM: number;
  spreaderPlateEveryM: number;
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
  positionM: number | null;
}

/** One line set of the schedule as the client sees it. */
export interface LineSetView {
  id: number;
  number: number;
  name: string;
  purchase: Purchase;
  pipeSize: string;
  pipeLengthM: number;
  pipeKg: number;
  liftLinesM: number[];
  liftLineRatingKg: number;
  battenRatingKgPerM: number;
  arborKg: number;
  arborCapacityKg: number;
  bricks: BrickCounts;
  outOfBalance: boolean;
  pieces: PieceView[];
}

export interface BrickTypeView {
  code: string;
  name: string;
  massKg: number;
  heightM: number | null;
  /** Bricks of this type waiting on the loading bridge. */
  bridgeCount: number;
}

/** `GET /api/schedule`. */
export interface ScheduleView {
  venue: VenueView;
  lineSets: LineSetView[];
  brickTypes: BrickTypeView[];
}
