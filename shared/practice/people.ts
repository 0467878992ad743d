/** Who takes part in a practice session: the person practising and the simulated crew around them. */
import type { BrickType } from '../rigging';
import type { SessionRole } from '../protocol/roles';

export const PRACTICE_ROLES = ['rail', 'loader', 'deck'] as const;
export type PracticeRole = (typeof PRACTICE_ROLES)[number];

export interface PracticePerson {
  personId: number;
  name: string;
  role: SessionRole;
  simulated: boolean;
}

/** Simulated people get ids far above any real person's, so a practice log never names a real one by mistake. */
export const SIMULATED_ID_BASE = 2_000_000_000;

/** Fictional first names for the simulated crew, each shown with "(simulated)". */
const SIMULATED_NAMES = ['Quill', 'Maren', 'Tobin', 'Wren'];

/**
 * The crew of a practice session: the person practising, plus a rail operator, two loaders and a
 * deck hand (the venue's usual minimum, common practice) for every role the person does not play.
 */
export function practiceCrew(you: { personId: number; name: string }, role: PracticeRole): PracticePerson[] {
  const needed: SessionRole[] = ['rail', 'loader', 'loader', 'deck'];
  needed.splice(needed.indexOf(role), 1);
  const simulated = needed.map((r, i): PracticePerson => ({
    personId: SIMULATED_ID_BASE + i + 1,
    name: `${SIMULATED_NAMES[i]} (simulated)`,
    role: r,
    simulated: true,
  }));
  const person: PracticePerson = { personId: you.personId, name: you.name, role, simulated: false };
  // The rail operator joins first and so leads.
  return role === 'rail' ? [person, ...simulated] : [simulated[0], person, ...simulated.slice(1)];
}

/**
 * Within this much of balance a set counts as balanced in a practice debrief: half the lightest brick,
 * the finest correction whole bricks can make (the plan's own remainder is below it).
 */
export function balancedWithinKg(brickTypes: readonly BrickType[]): number {
  const lightest = Math.min(...brickTypes.map((b) => b.massKg));
  // A milligram of slack: a remainder of exactly half a brick (5 lb with 10 lb bricks) counts as balanced.
  return (Number.isFinite(lightest) ? lightest / 2 : 0.5) + 1e-6;
}
