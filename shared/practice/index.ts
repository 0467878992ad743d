/** Practice sessions: the live session's rules against a simulated crew, and their debrief. */
export * from './people';
export * from './engine';
export * from './crew';
export * from './debrief';
export { seededRandom, humanDelayMs, type Random } from './random';
export { inventedLineSet } from './invented';
