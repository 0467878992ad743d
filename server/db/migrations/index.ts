import { Foundation1764633600000 } from './1764633600000-Foundation';

/** Every migration, oldest first. Passed as classes: tsx and Vitest both resolve them without globs. */
export const migrations = [Foundation1764633600000];
