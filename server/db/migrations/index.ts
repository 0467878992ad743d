import { Foundation1764633600000 } from './1764633600000-Foundation';
import { LoadingSessions1764720000000 } from './1764720000000-LoadingSessions';
import { ActionKeyOwner1764806400000 } from './1764806400000-ActionKeyOwner';
import { VenueSchedule1765200000000 } from './1765200000000-VenueSchedule';
import { Photos1765390000000 } from './1765390000000-Photos';
import { MailAndCrew1765500000000 } from './1765500000000-MailAndCrew';
import { SharedAcrossServers1765600000000 } from './1765600000000-SharedAcrossServers';
import { PracticeRuns1765800000000 } from './1765800000000-PracticeRuns';
import { VenueTimeZone1766300000000 } from './1766300000000-VenueTimeZone';

/** Every migration, oldest first. Passed as classes: tsx and Vitest both resolve them without globs. */
export const migrations = [
  Foundation1764633600000, LoadingSessions1764720000000, ActionKeyOwner1764806400000, VenueSchedule1765200000000,
  Photos1765390000000, MailAndCrew1765500000000, SharedAcrossServers1765600000000, PracticeRuns1765800000000,
  VenueTimeZone1766300000000,
];
