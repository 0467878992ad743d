/**
 * Words the session screens show that depend on the venue's units ("pull 2 bricks, 20 lb each").
 * The sentences that do not (what must happen next, log lines) come from shared/protocol/session.
 */
import { utcOffsetName } from '@shared/protocol/time-zone';
import { brickRuns, formatMass, KG_PER_LB, type BrickCounts, type BrickType, type PlanStep, type Units } from '@shared/rigging';

/** Below this the set reads as balanced (the same threshold as the session's own words). */
export const BALANCED_WITHIN_KG = 0.05;

export type HeavySide = 'pipe' | 'arbor' | 'balanced';

export function heavySide(imbalanceKg: number): HeavySide {
  if (Math.abs(imbalanceKg) < BALANCED_WITHIN_KG) return 'balanced';
  return imbalanceKg > 0 ? 'pipe' : 'arbor';
}

/** "Pipe-heavy by 40 lb", "Arbor-heavy by 2.3 kg" or "Balanced". */
export function balanceWords(imbalanceKg: number, units: Units): string {
  const side = heavySide(imbalanceKg);
  if (side === 'balanced') return 'Balanced';
  return `${side === 'pipe' ? 'Pipe' : 'Arbor'}-heavy by ${formatMass(Math.abs(imbalanceKg), units)}`;
}

/** The two sides of a balance and the balance itself, as shown together: "108.7 lb", "107.1 lb", "Pipe-heavy by 1.6 lb". */
export interface BalanceSides {
  battenSide: string;
  arborSide: string;
  words: string;
  side: HeavySide;
}

/**
 * Rounds each side once, to the 0.1 lb or 0.1 kg the screens show, and states the balance as the
 * difference of those rounded figures, so what is shown always subtracts: 108.7 − 107.1 = 1.6, never 1.7.
 * `arborAtBattenKg` is the arbor side as the batten feels it (divided by the purchase).
 */
export function balanceSides(battenKg: number, arborAtBattenKg: number, units: Units): BalanceSides {
  const unit = units === 'imperial' ? 'lb' : 'kg';
  const tenths = (kg: number) => Math.round((units === 'imperial' ? kg / KG_PER_LB : kg) * 10);
  const batten = tenths(battenKg);
  const arbor = tenths(arborAtBattenKg);
  const show = (t: number) => `${t / 10} ${unit}`;
  const diff = batten - arbor;
  const side: HeavySide = diff === 0 ? 'balanced' : diff > 0 ? 'pipe' : 'arbor';
  const words = side === 'balanced' ? 'Balanced' : `${side === 'pipe' ? 'Pipe' : 'Arbor'}-heavy by ${show(Math.abs(diff))}`;
  return { battenSide: show(batten), arborSide: show(arbor), words, side };
}

function countsOf(bricks: BrickCounts | undefined): Array<[string, number]> {
  return Object.entries(bricks ?? {}).filter(([, n]) => n > 0);
}

/** "2 bricks, 20 lb each" with one brick type in play; "2 full (20 lb each) and 1 half (10 lb each)" with several. */
export function bricksWords(bricks: BrickCounts | undefined, brickTypes: BrickType[], units: Units): string {
  const entries = countsOf(bricks);
  const massOf = (type: string) => brickTypes.find((b) => b.type === type)?.massKg ?? 0;
  if (entries.length === 1) {
    const [type, n] = entries[0];
    const kind = brickTypes.length > 1 ? `${type} ` : '';
    return `${n} ${kind}${n === 1 ? 'brick' : 'bricks'}, ${formatMass(massOf(type), units)} each`;
  }
  const parts = entries.map(([type, n]) => `${n} ${type} (${formatMass(massOf(type), units)} each)`);
  return parts.length ? `${parts.slice(0, -1).join(', ')}${parts.length > 1 ? ' and ' : ''}${parts.at(-1)} bricks` : 'no bricks';
}

function brickStepHead(step: PlanStep, brickTypes: BrickType[], units: Units): string {
  const verb = step.kind === 'add-bricks' ? 'Load' : 'Pull';
  return `${verb} ${bricksWords(step.bricks, brickTypes, units)}`;
}

/**
 * Where a brick step's spreader plates go, in the order the loaders work: "24, place a spreader plate,
 * then 21 more"; "take off a spreader plate, then pull 8". Empty when the step passes no plate.
 */
export function spreaderPlateWords(step: PlanStep, brickTypes: BrickType[]): string {
  if (!step.spreaderPlatesAt?.length || !step.bricks) return '';
  const loading = step.kind === 'add-bricks';
  const plate = loading ? 'place a spreader plate' : 'take off a spreader plate';
  const count = (bricks: BrickCounts) => {
    const entries = countsOf(bricks);
    if (brickTypes.length <= 1) return String(entries.reduce((sum, [, n]) => sum + n, 0));
    const parts = entries.map(([type, n]) => `${n} ${type}`);
    return `${parts.slice(0, -1).join(', ')}${parts.length > 1 ? ' and ' : ''}${parts.at(-1)}`;
  };
  const items: string[] = [];
  let bricksSoFar = false;
  for (const run of brickRuns(step.bricks, brickTypes, step.spreaderPlatesAt)) {
    if (countsOf(run.bricks).length) {
      items.push(bricksSoFar ? `${count(run.bricks)} more` : items.length ? `${loading ? 'load' : 'pull'} ${count(run.bricks)}` : count(run.bricks));
      bricksSoFar = true;
    }
    if (run.plateAfter) items.push(plate);
  }
  if (items.length > 1) items[items.length - 1] = `then ${items[items.length - 1]}`;
  return items.join(', ');
}

/** The big line on a loader's screen: "Pull 2 bricks, 20 lb each", with where any spreader plate goes. */
export function brickStepWords(step: PlanStep, brickTypes: BrickType[], units: Units): string {
  const plates = spreaderPlateWords(step, brickTypes);
  return `${brickStepHead(step, brickTypes, units)}${plates ? `: ${plates}` : ''}`;
}

/** "14 bricks" or "14 bricks: 12 full, 2 half". */
export function arborCountWords(bricks: BrickCounts, brickTypes: BrickType[]): string {
  const entries = countsOf(bricks);
  const total = entries.reduce((sum, [, n]) => sum + n, 0);
  const head = `${total} ${total === 1 ? 'brick' : 'bricks'}`;
  if (brickTypes.length <= 1 || entries.length === 0) return head;
  return `${head}: ${entries.map(([type, n]) => `${n} ${type}`).join(', ')}`;
}

/** "14:03:27", the time of day to the second, as the log shows it, in the venue's zone (else the phone's). */
export function clockTime(ms: number, timeZone?: string): string {
  return new Date(ms).toLocaleTimeString('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23' });
}

/** "2026-12-02" in the zone: which day a moment falls on there. */
function dayIn(ms: number, timeZone?: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(ms);
}

/**
 * When a log entry happened, as the log shows it, in the venue's zone: the time of day alone when it is
 * today there, with the day ("1 Dec, 14:03:27") when not, and the year too when not this year.
 */
export function logTime(ms: number, nowMs: number = Date.now(), timeZone?: string): string {
  const day = dayIn(ms, timeZone);
  const today = dayIn(nowMs, timeZone);
  if (day === today) return clockTime(ms, timeZone);
  const sameYear = day.slice(0, 4) === today.slice(0, 4);
  const date = new Date(ms).toLocaleDateString('en-GB', { timeZone, day: 'numeric', month: 'short', ...(sameYear ? {} : { year: 'numeric' }) });
  return `${date}, ${clockTime(ms, timeZone)}`;
}

/** A plan step in the venue's units, for plan lists and the big step line. */
export function stepWords(step: PlanStep, brickTypes: BrickType[], units: Units, pieceNames: Record<string, string> = {}): string {
  const piece = step.pieceId ? (pieceNames[step.pieceId] ?? step.pieceId) : null;
  switch (step.kind) {
    case 'remove-bricks':
    case 'add-bricks':
    {
      const plates = spreaderPlateWords(step, brickTypes);
      return `${brickStepHead(step, brickTypes, units)}${piece ? ` for ${piece}` : ''}${plates ? `: ${plates}` : ''}`;
    }
    case 'remove-piece':
      return `Take ${piece ?? 'the piece'} off the batten`;
    case 'add-piece':
      return `Hang ${piece ?? 'the piece'} on the batten${step.massKg ? ` (${formatMass(step.massKg, units)})` : ''}`;
    case 'tie-off':
      return 'Tie off the set at the rail';
    case 'untie':
      return 'Untie the set at the rail';
    case 'test-balance':
      return 'Test the balance at the rail';
  }
}

/** Who does a step, in words for the plan list. */
export function stepWho(step: PlanStep): string {
  if (step.kind === 'remove-bricks' || step.kind === 'add-bricks') return 'Loaders';
  if (step.kind === 'remove-piece' || step.kind === 'add-piece') return 'Deck';
  return 'Rail';
}

/**
 * "2 Dec 2026, 14:05:09 UTC+1": the date and the time to the second (the record spans days), in the
 * venue's zone (else the phone's), with that zone's offset so the time is never ambiguous.
 */
export function dateTime(ms: number, timeZone?: string): string {
  const stamp = new Date(ms).toLocaleString('en-GB', {
    timeZone, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', second: '2-digit', hourCycle: 'h23',
  });
  return `${stamp} ${utcOffsetName(ms, timeZone)}`;
}
/**
 * The computed balance (from the schedule's weights) and, once the rail has tested the set, the
 * measured one beside it: "Computed: balanced · Measured at the rail: pipe-heavy by 5 lb".
 */
export function balanceFigures(lineSet: { imbalanceKg: number; measuredKg?: number }, units: Units): string {
  const computed = `Computed: ${balanceWords(lineSet.imbalanceKg, units).toLowerCase()}`;
  return lineSet.measuredKg === undefined ? computed : `${computed} · Measured at the rail: ${balanceWords(lineSet.measuredKg, units).toLowerCase()}`;
}

