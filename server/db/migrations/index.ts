import { Foundation1764633600000 } from './1764633600000-Foundation';
import { LoadingSessions1764720000000 } from './1764720000000-LoadingSessions';

/** Every migration, oldest first. Passed as classes: tsx and Vitest both resolve them without globs. */
export const migrations = [Foundation1764633600000, LoadingSessions1764720000000];
