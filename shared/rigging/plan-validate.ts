/** Checks a plan request before any planning: every problem found, in words a crew member understands. */
import type { BrickCounts, PlanInput, PlanWarning } from './types';

const isMass = (kg: unknown): boolean => typeof kg === 'number' && Number.isFinite(kg) && kg >= 0;

function countErrors(counts: BrickCounts, where: string, known: Set<string>): string[] {
  const errors: string[] = [];
  for (const [type, count] of Object.entries(counts)) {
    if (!Number.isInteger(count) || count < 0) errors.push(`The count of "${type}" bricks ${where} must be a whole number.`);
    else if (count > 0 && !known.has(type)) errors.push(`"${type}" bricks ${where} are not one of the venue's brick types.`);
  }
  return errors;
}

/** Errors that make a plan impossible to compute (bad numbers, unknown pieces or bricks). Empty when the request is sound. */
export function planInputErrors(input: PlanInput): PlanWarning[] {
  const messages: string[] = [];
  const fail = (code: string, message: string) => ({ severity: 'error' as const, code, message });
  const problems: PlanWarning[] = [];

  if (input.purchase !== 1 && input.purchase !== 2) messages.push('Purchase must be single (1) or double (2).');
  if (!isMass(input.pipeKg)) messages.push('The pipe weight must be zero or more.');
  if (!isMass(input.arborKg)) messages.push('The empty arbor weight must be zero or more.');
  if (!(Number.isFinite(input.ropeLockLimitKg) && input.ropeLockLimitKg >= 0)) {
    messages.push('The rope lock limit must be zero or more.');
  }
  if (input.arborCapacityKg !== undefined && !(input.arborCapacityKg > 0 && Number.isFinite(input.arborCapacityKg))) {
    messages.push('The arbor capacity, if given, must be more than zero.');
  }
  const known = new Set<string>();
  for (const b of input.brickTypes) {
    if (known.has(b.type)) messages.push(`Brick type "${b.type}" is listed twice.`);
    known.add(b.type);
    if (!(b.massKg > 0 && Number.isFinite(b.massKg))) messages.push(`Brick type "${b.type}" needs a weight above zero.`);
  }
  messages.push(...countErrors(input.bricks, 'on the arbor', known));
  messages.push(...countErrors(input.bridgeStock, 'on the loading bridge', known));

  const onBatten = new Set<string>();
  for (const p of input.pieces) {
    if (onBatten.has(p.id)) messages.push(`Piece "${p.id}" is listed twice on the batten.`);
    onBatten.add(p.id);
    if (!isMass(p.massKg)) messages.push(`Piece "${p.id}" needs a weight of zero or more.`);
  }
  if (messages.length) problems.push(...messages.map((m) => fail('invalid-input', m)));

  const removing = new Set<string>();
  for (const id of input.remove) {
    if (!onBatten.has(id)) problems.push(fail('piece-not-found', `Piece "${id}" is not on this batten, so it cannot come off.`));
    else if (removing.has(id)) problems.push(fail('piece-duplicate', `Piece "${id}" is listed twice to come off.`));
    removing.add(id);
  }
  const adding = new Set<string>();
  for (const p of input.add) {
    if (!isMass(p.massKg)) problems.push(fail('invalid-input', `Piece "${p.id}" to hang needs a weight of zero or more.`));
    if (adding.has(p.id)) problems.push(fail('piece-duplicate', `Piece "${p.id}" is listed twice to hang.`));
    else if (onBatten.has(p.id) && !removing.has(p.id)) {
      problems.push(fail('piece-duplicate', `Piece "${p.id}" is already on the batten.`));
    }
    adding.add(p.id);
  }
  return problems;
}
