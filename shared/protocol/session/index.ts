/** A live loading session: schemas, state, the rules (`decide`) and the views both sides read. */
export * from './schema';
export * from './state';
export * from './machine';
export * from './views';
export * from './events';
export { balanceText, lineSetLabel, stepText, stepRole } from './words';
