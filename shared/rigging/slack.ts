/**
 * Lift lines are wire ropes: they pull the batten up and never push it down. Where the rigid
 * continuous-beam solution (`liftLineLoads`) gives a line a negative load, that line goes slack and
 * the batten hangs from the others. This solves the batten on one-way supports: drop the most
 * negative line, solve again, and take a dropped line back when the batten would sag below it
 * (the line is taut there after all), until every line is either taut and pulling or slack with the
 * batten at or above it.
 */
import { liftLineLoads, type LiftLineLoadsInput } from './beam';

export type HangingBatten =
  | {
      holds: true;
      /** kg on each lift line, in the order given; 0 on a slack line. */
      loadsKg: number[];
      /** Indices (in the order given) of the lines that go slack. */
      slackLines: number[];
    }
  | {
      holds: false;
      /** The load's centre lies past this line (index in the order given): the batten tips about it. */
      tipsAbout: number;
      /** Where the centre of all the weight lies, m from the batten's start. */
      centreM: number;
    };

/** Total weight and its moment about the batten's start, in kg and kg·m. */
function resultant({ lengthM, selfMassKgPerM, pointLoads = [], spreadLoads = [] }: LiftLineLoadsInput) {
  let kg = selfMassKgPerM * lengthM;
  let moment = (selfMassKgPerM * lengthM * lengthM) / 2;
  for (const p of pointLoads) {
    kg += p.massKg;
    moment += p.massKg * p.atM;
  }
  for (const s of spreadLoads) {
    kg += s.massKg;
    moment += (s.massKg * (s.fromM + s.toM)) / 2;
  }
  return { kg, moment };
}

/**
 * The batten's deflection × EI (upward) at `atM`, hanging from `lines` with the loads `reactions`,
 * by Macaulay's method: integrate the bending moment twice and fix the two constants with zero
 * deflection at the first and last taut line.
 */
function deflectionTimesEI(input: LiftLineLoadsInput, lines: number[], reactions: number[]): (atM: number) => number {
  const { lengthM, selfMassKgPerM, pointLoads = [], spreadLoads = [] } = input;
  const cube = (x: number) => (x > 0 ? (x * x * x) / 6 : 0);
  const fourth = (x: number) => (x > 0 ? (x * x * x * x) / 24 : 0);
  const spreads = [...spreadLoads, { fromM: 0, toM: lengthM, massKg: selfMassKgPerM * lengthM }];
  const twice = (x: number) => {
    let v = 0;
    lines.forEach((at, k) => (v += reactions[k] * cube(x - at)));
    for (const p of pointLoads) v -= p.massKg * cube(x - p.atM);
    for (const s of spreads) {
      const width = s.toM - s.fromM;
      if (width < 1e-9) v -= s.massKg * cube(x - (s.fromM + s.toM) / 2);
      else v -= (s.massKg / width) * (fourth(x - s.fromM) - fourth(x - s.toM));
    }
    return v;
  };
  const a = Math.min(...lines);
  const b = Math.max(...lines);
  const slope = -(twice(b) - twice(a)) / (b - a);
  const offset = -twice(a) - slope * a;
  return (x) => twice(x) + slope * x + offset;
}

/**
 * kg on each lift line with slack lines allowed, or that the batten tips because the centre of its
 * weight lies beyond the outermost line (an overhang no line can hold). Masses must not be negative.
 */
export function slackAwareLiftLineLoads(input: LiftLineLoadsInput): HangingBatten {
  const all = input.liftLinesM;
  // liftLineLoads checks the geometry (and throws a RangeError on a batten it cannot solve).
  const rigid = liftLineLoads(input);
  const loads = [...(input.pointLoads ?? []), ...(input.spreadLoads ?? [])];
  if (!(input.selfMassKgPerM >= 0) || loads.some((l) => !(l.massKg >= 0))) {
    throw new RangeError('A batten on slack-able lift lines takes no negative weights.');
  }
  const { kg: totalKg, moment } = resultant(input);
  const tol = 1e-9 * Math.max(1, totalKg);
  // Less than a microgram in all: nothing to hang (and a centre of nothing is noise).
  if (totalKg < 1e-9) return { holds: true, loadsKg: all.map(() => 0), slackLines: [] };

  const centreM = moment / totalKg;
  const lowest = all.indexOf(Math.min(...all));
  const highest = all.indexOf(Math.max(...all));
  const reach = 1e-9 * Math.max(1, input.lengthM);
  if (centreM < all[lowest] - reach) return { holds: false, tipsAbout: lowest, centreM };
  if (centreM > all[highest] + reach) return { holds: false, tipsAbout: highest, centreM };

  let taut = all.map((_, i) => i);
  let reactions = rigid;
  const seen = new Set<string>();
  for (;;) {
    const key = taut.join(',');
    if (seen.has(key)) throw new Error('The slack lift line solution did not settle.');
    seen.add(key);
    // Drop the line pushed hardest (one at a time: dropping one can pull the others back to tension).
    let worst = -1;
    reactions.forEach((r, k) => {
      if (r < -tol && (worst < 0 || r < reactions[worst])) worst = k;
    });
    if (worst >= 0 && taut.length > 2) {
      taut = taut.filter((_, k) => k !== worst);
    } else {
      // With every taut line pulling, take back the slack line the batten would sag below most.
      const lines = taut.map((i) => all[i]);
      const v = deflectionTimesEI(input, lines, reactions);
      const sagTol = 1e-12 * totalKg * input.lengthM ** 3;
      let back = -1;
      let deepest = -sagTol;
      all.forEach((x, i) => {
        if (taut.includes(i)) return;
        const sag = v(x);
        if (sag < deepest) {
          deepest = sag;
          back = i;
        }
      });
      if (back < 0 && worst < 0) break;
      // Two taut lines, one pushed: the centre is outside them, so a line on its side must carry.
      if (back < 0) {
        const pushed = taut[worst];
        const other = taut[1 - worst];
        const away = all[pushed] < all[other] ? 1 : -1;
        const candidates = all.map((_, i) => i).filter((i) => !taut.includes(i) && (all[i] - all[other]) * away > 0);
        if (!candidates.length) throw new Error('The slack lift line solution did not settle.');
        back = candidates.reduce((best, i) => (Math.abs(all[i] - centreM) < Math.abs(all[best] - centreM) ? i : best));
        taut = taut.filter((i) => i !== pushed);
      }
      taut = [...taut, back].sort((p, q) => all[p] - all[q]);
    }
    reactions = liftLineLoads({ ...input, liftLinesM: taut.map((i) => all[i]) });
  }

  const loadsKg = all.map(() => 0);
  taut.forEach((i, k) => (loadsKg[i] = Math.max(0, reactions[k])));
  const slackLines = all.map((_, i) => i).filter((i) => !taut.includes(i));
  return { holds: true, loadsKg, slackLines };
}
