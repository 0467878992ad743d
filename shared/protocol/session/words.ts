/**
 * The plain words a session speaks: what a step is, and what must happen next.
 * Refusals and the role screens use the same sentences, so the reason a phone shows on a refusal
 * is the same instruction the right person already sees on their own screen.
 */
import { formatMass, type BrickCounts, type PlanStep, type Units } from '../../rigging';
import { ROLE_LABELS, type SessionRole } from '../roles';
import type { ProxyClearVia } from './schema';
import {
  activeLineSet,
  crewShortfall,
  correctionOf,
  isBrickStep,
  isTestOnly,
  missingStepRoles,
  nextWorkStepIndex,
  notYetClear,
  type Hold,
  type MissingStepRole,
  type LineSetState,
  type SessionState,
} from './state';

/** "line set 7" for a bare number, otherwise the name as given ("Main drape"). */
export function lineSetLabel(name: string): string {
  return /^\d+[A-Za-z]?$/.test(name.trim()) ? `line set ${name.trim()}` : name;
}

/** Capitalise the first letter of a sentence. */
export const capital = (text: string): string => text.charAt(0).toUpperCase() + text.slice(1);

/** "Ana", "Ana and Ben", "Ana, Ben and Cy". */
export function nameList(names: string[]): string {
  if (names.length <= 1) return names[0] ?? 'nobody';
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** "2 bricks" with one brick type at the venue, "2 full and 1 half bricks" with several. */
export function bricksText(bricks: BrickCounts | undefined, brickTypeCount: number): string {
  const entries = Object.entries(bricks ?? {}).filter(([, n]) => n > 0);
  const total = entries.reduce((sum, [, n]) => sum + n, 0);
  const noun = total === 1 ? 'brick' : 'bricks';
  if (brickTypeCount <= 1 || entries.length === 0) return `${total} ${noun}`;
  return `${nameList(entries.map(([type, n]) => `${n} ${type}`))} ${noun}`;
}

/** "9.0 kg pipe-heavy", "20 lb arbor-heavy" (in the venue's units), or "balanced". */
export function balanceText(imbalanceKg: number, units?: Units): string {
  if (Math.abs(imbalanceKg) < 0.05) return 'balanced';
  const amount = units ? formatMass(Math.abs(imbalanceKg), units) : `${Math.abs(imbalanceKg).toFixed(1)} kg`;
  return `${amount} ${imbalanceKg > 0 ? 'pipe-heavy' : 'arbor-heavy'}`;
}

function pieceName(ls: LineSetState, pieceId: string | undefined): string {
  if (!pieceId) return 'the piece';
  return ls.pieceNames[pieceId] ?? pieceId;
}

/** The piece a brick step serves: unloading pulls bricks before the piece comes off; loading adds them after it is hung. */
function pieceForBricks(ls: LineSetState, index: number): string | undefined {
  const step = ls.steps[index];
  const after = ls.steps.slice(index + 1).find((s) => s.kind === 'remove-piece' || s.kind === 'add-piece');
  const before = [...ls.steps.slice(0, index)].reverse().find((s) => s.kind === 'remove-piece' || s.kind === 'add-piece');
  const first = step.kind === 'add-bricks' ? (before ?? after) : (after ?? before);
  return first?.pieceId;
}

/** Who does a work step: bricks are a loader's, pieces the deck crew's. */
export function stepRole(step: PlanStep): SessionRole | null {
  if (isBrickStep(step)) return 'loader';
  if (step.kind === 'remove-piece' || step.kind === 'add-piece') return 'deck';
  return null;
}

/** ", placing a spreader plate after bricks 12 and 24" (loading) or ", taking off a spreader plate before brick 7" (unloading). */
function platesText(step: PlanStep): string {
  const at = step.spreaderPlatesAt;
  if (!at?.length) return '';
  const loading = step.kind === 'add-bricks';
  // Loading: the plate goes on after the count; unloading: it comes off before the next brick.
  const bricks = at.map((n) => String(loading ? n : n + 1));
  const list = bricks.length === 1 ? bricks[0] : `${bricks.slice(0, -1).join(', ')} and ${bricks.at(-1)}`;
  const plates = at.length === 1 ? 'a spreader plate' : `${at.length} spreader plates`;
  return `, ${loading ? 'placing' : 'taking off'} ${plates} ${loading ? 'after' : 'before'} brick${at.length === 1 ? '' : 's'} ${list}`;
}

type PastOr = (present: string, past: string) => string;
function removeBricksText(ls: LineSetState, index: number, pastOr: PastOr): string {
  const piece = pieceForBricks(ls, index);
  return `${pastOr('pull', 'pulled')} ${bricksText(ls.steps[index].bricks, ls.brickTypes.length)}${piece ? ` for ${pieceName(ls, piece)}` : ' from the arbor'}${platesText(ls.steps[index])}`;
}
function addBricksText(ls: LineSetState, index: number, pastOr: PastOr): string {
  const piece = pieceForBricks(ls, index);
  return `${pastOr('load', 'loaded')} ${bricksText(ls.steps[index].bricks, ls.brickTypes.length)}${piece ? ` for ${pieceName(ls, piece)}` : ' onto the arbor'}${platesText(ls.steps[index])}`;
}

/** A step as an instruction without a subject: "pull 2 bricks for Drape A", "take Drape A off the batten". */
export function stepText(ls: LineSetState, index: number, tense: 'do' | 'done' = 'do'): string {
  const step = ls.steps[index];
  const typeCount = ls.brickTypes.length;
  const pastOr = (present: string, past: string) => (tense === 'do' ? present : past);
  switch (step.kind) {
    case 'remove-bricks':
    case 'add-bricks':
      if (correctionOf(ls, index)) {
        return step.kind === 'add-bricks'
          ? `${pastOr('load', 'loaded')} ${bricksText(step.bricks, typeCount)} onto the arbor of ${lineSetLabel(ls.name)} to correct its balance${platesText(step)}`
          : `${pastOr('pull', 'pulled')} ${bricksText(step.bricks, typeCount)} off the arbor of ${lineSetLabel(ls.name)} to correct its balance${platesText(step)}`;
      }
      return step.kind === 'add-bricks' ? addBricksText(ls, index, pastOr) : removeBricksText(ls, index, pastOr);
    case 'remove-piece':
      return `${pastOr('take', 'took')} ${pieceName(ls, step.pieceId)} off the batten`;
    case 'add-piece':
      return `${pastOr('hang', 'hung')} ${pieceName(ls, step.pieceId)} on the batten`;
    case 'tie-off':
      return `${pastOr('tie', 'tied')} off ${lineSetLabel(ls.name)} at the rail`;
    case 'untie':
      return `${pastOr('untie', 'untied')} ${lineSetLabel(ls.name)}`;
    case 'test-balance':
      return `${pastOr('test', 'tested')} the balance of ${lineSetLabel(ls.name)}`;
  }
}

/** "The loaders must pull 2 bricks for Drape A" (no full stop; callers add "first." or similar). */
export function stepDuty(ls: LineSetState, index: number): string {
  const role = stepRole(ls.steps[index]);
  const who = role === 'loader' ? 'The loaders' : role === 'deck' ? 'The deck crew' : 'The rail operator';
  return `${who} must ${stepText(ls, index)}`;
}

/** How the lead heard a silent person's "clear": "answered clear by voice". */
export const PROXY_VIA_WORDS: Record<ProxyClearVia, string> = {
  voice: 'answered clear by voice',
  radio: 'answered clear over the radio',
  seen: 'seen standing clear',
};

export function holdText(hold: Hold): string {
  const why = hold.reason ? ` ("${hold.reason}")` : '';
  return `A hold is on, called by ${hold.byName}${why}. Nothing goes ahead until the rail operator releases it.`;
}

/**
 * What must happen next on this line set, as "X must do Y" (no full stop).
 * Refusals append " first."; waitingOn uses it as it is.
 */
export function lineSetDuty(state: SessionState, ls: LineSetState): string {
  const label = lineSetLabel(ls.name);
  switch (ls.stage) {
    case 'waiting':
      return `The rail operator must call ${label} in to the loading position`;
    case 'move-called': {
      const silent = notYetClear(state);
      if (silent.length) return `${nameList(silent.map((p) => p.name))} must answer "clear"`;
      return `The rail operator must confirm ${label} is in position and locked`;
    }
    case 'in-position':
      if (ls.needsTieOff && !ls.tiedOff) return `The rail operator must tie off ${label}`;
      if (isTestOnly(ls)) return `The rail operator must test the balance of ${label}`;
      return 'The loaders must call to clear the rail';
    case 'rail-clear-called':
      return 'The rail operator must step back from the rail and confirm it is clear';
    case 'rail-clear': {
      const next = nextWorkStepIndex(ls);
      return next >= 0 ? stepDuty(ls, next) : 'The loaders must call "loading complete"';
    }
    case 'loading-complete':
      if (ls.tiedOff) return `The rail operator must untie ${label}`;
      return `The rail operator must test the balance of ${label}`;
    case 'tested': {
      const next = state.lineSets.find((l) => l.stage === 'waiting');
      if (next) return `The rail operator must call ${lineSetLabel(next.name)} in to the loading position`;
      const flagged = state.lineSets.filter((l) => l.flagged);
      if (flagged.length) {
        return `The rail operator must work out the correction for ${nameList(flagged.map((l) => lineSetLabel(l.name)))} and test again, or end the session`;
      }
      return 'Nothing more: every line set is tested';
    }
  }
}

/** What must happen next in the whole session (before, during and after loading), without a full stop. */
export function sessionDuty(state: SessionState): string {
  if (state.phase === 'finished') return 'Nothing more: the session has finished';
  if (state.phase === 'gathering') {
    if (state.leadPersonId === null) return 'A rail operator must join to lead the session';
    const missing = missingStepRoles(state);
    if (missing.length) {
      const parts = missing.map(({ role, lineSetNames }) => {
        const sets = nameList(lineSetNames.map(lineSetLabel));
        return role === 'loader' ? `a loader for the brick steps on ${sets}` : `a deck crew member for the deck steps on ${sets}`;
      });
      return capital(parts.join(', and ')).replace(/^(A loader|A deck crew member)/, '$1 must join');
    }
    const short = crewShortfall(state);
    if (short.length) {
      return `The crew must join (${shortText(short)}), or the lead must begin short with a reason`;
    }
    return 'The rail operator must begin loading';
  }
  const ls = activeLineSet(state);
  if (!ls) return `The rail operator must call ${lineSetLabel(state.lineSets[0].name)} in to the loading position`;
  return lineSetDuty(state, ls);
}

/** "need 2 loaders, 1 joined; need 1 deck crew, 0 joined". */
export function shortText(short: ReturnType<typeof crewShortfall>): string {
  return short
    .map(({ role, need, joined }) => `need ${need} ${ROLE_LABELS[role].toLowerCase()}${need > 1 && role !== 'deck' ? 's' : ''}, ${joined} joined`)
    .join('; ');
}

/** "Nobody joined can do the deck steps (hanging or taking off pieces on line set 7): a deck crew member must join." */
export function missingStepRolesText(missing: MissingStepRole[]): string {
  return missing
    .map(({ role, lineSetNames }) => {
      const sets = nameList(lineSetNames.map(lineSetLabel));
      return role === 'deck'
        ? `Nobody joined can do the deck steps (hanging or taking off pieces on ${sets}): a deck crew member must join.`
        : `Nobody joined can do the loaders' steps (bricks on ${sets}): a loader must join.`;
    })
    .join(' ');
}

/** What state a line set was left in when the session finished, in words for every screen and the log. */
export function lineSetOutcome(ls: LineSetState): string {
  const last = ls.tests.at(-1);
  const tie = ls.tiedOff ? ', tied off at the rail' : '';
  if (last && ls.stage === 'tested') {
    return last.result === 'balanced' ? 'tested in balance' : `tested ${last.result}, flagged to be corrected${tie}`;
  }
  if (!ls.done.some(Boolean) && ls.stage === 'waiting') return 'not started: its load is unchanged';
  if (!ls.done.some(Boolean)) return `not worked (${ls.stage === 'move-called' ? 'called, not yet in position' : 'in position, nothing loaded'}): its load is unchanged${tie}`;
  const left = ls.steps.filter((s, i) => !ls.done[i] && (s.kind !== 'test-balance')).length;
  return left > 0
    ? `stopped part way (${left} step${left === 1 ? '' : 's'} not done), not tested: flagged${tie}`
    : `worked but not tested: flagged${tie}`;
}
