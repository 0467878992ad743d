/**
 * Load on each lift line of a batten, treated as one continuous beam over rigid supports with
 * constant stiffness, with overhangs past the end lines. Solved with the three-moment equation
 * (Clapeyron): one equation per inner lift line for the bending moment there; two lift lines need
 * none and reduce to plain statics.
 */
import { Matrix, solve } from 'ml-matrix';

/** A load hung at one point of the batten, `atM` from the batten's start (stage-left end, say). */
export interface PointLoad {
  atM: number;
  massKg: number;
}

/** A load spread evenly from `fromM` to `toM` along the batten (a drape, a border). */
export interface SpreadLoad {
  fromM: number;
  toM: number;
  massKg: number;
}

export interface LiftLineLoadsInput {
  /** Length of the batten pipe, m. */
  lengthM: number;
  /** Where each lift line picks up the batten, m from the batten's start. Any order; at least two. */
  liftLinesM: number[];
  /** The pipe's own mass per metre, spread over its whole length. */
  selfMassKgPerM: number;
  pointLoads?: PointLoad[];
  spreadLoads?: SpreadLoad[];
}

/** Loads on one stretch between supports (or on an overhang), positions measured from the stretch's start. */
interface SpanLoads {
  points: { a: number; kg: number }[];
  spreads: { c: number; d: number; kgPerM: number }[];
}

function validate({ lengthM, liftLinesM, selfMassKgPerM, pointLoads = [], spreadLoads = [] }: LiftLineLoadsInput): void {
  if (!(lengthM > 0)) throw new RangeError('The batten needs a positive length.');
  if (liftLinesM.length < 2) throw new RangeError('A batten hangs from at least two lift lines.');
  const inside = (x: number) => Number.isFinite(x) && x >= 0 && x <= lengthM;
  if (!liftLinesM.every(inside)) throw new RangeError('Every lift line must be on the batten (0 to its length).');
  if (new Set(liftLinesM).size !== liftLinesM.length) throw new RangeError('Two lift lines cannot pick up the same point.');
  if (!(selfMassKgPerM >= 0)) throw new RangeError('The pipe mass per metre cannot be negative.');
  for (const p of pointLoads) {
    if (!inside(p.atM) || !Number.isFinite(p.massKg)) throw new RangeError('Every point load must sit on the batten.');
  }
  for (const s of spreadLoads) {
    if (!inside(s.fromM) || !inside(s.toM) || !(s.toM >= s.fromM) || !Number.isFinite(s.massKg)) {
      throw new RangeError('Every spread load must run forward along the batten, within its length.');
    }
  }
}

/** F(x) = L²x²/2 − x⁴/4: the integral of x(L² − x²), which the spread-load terms need. */
const ringIntegral = (L: number, x: number) => (L * L * x * x) / 2 - (x * x * x * x) / 4;

/**
 * kg carried by each lift line, in the order given. Masses stand in for forces (g cancels).
 * A negative value means the line would be pushed up, i.e. go slack: the batten tips about its neighbour.
 */
export function liftLineLoads(input: LiftLineLoadsInput): number[] {
  validate(input);
  const { lengthM, liftLinesM, selfMassKgPerM, pointLoads = [], spreadLoads = [] } = input;
  const order = liftLinesM.map((x, i) => ({ x, i })).sort((p, q) => p.x - q.x);
  const xs = order.map((o) => o.x);
  const n = xs.length;

  // Stretch k: 0 = overhang before the first line, 1..n-1 = spans, n = overhang after the last line.
  const bounds = [0, ...xs, lengthM];
  const stretches: SpanLoads[] = Array.from({ length: n + 1 }, () => ({ points: [], spreads: [] }));
  const stretchOf = (x: number): number => {
    let k = 0;
    while (k < n && x > xs[k]) k++;
    return k;
  };
  for (const p of pointLoads) {
    if (p.massKg === 0) continue;
    const k = stretchOf(p.atM);
    stretches[k].points.push({ a: p.atM - bounds[k], kg: p.massKg });
  }
  const spreads = [...spreadLoads];
  if (selfMassKgPerM > 0) spreads.push({ fromM: 0, toM: lengthM, massKg: selfMassKgPerM * lengthM });
  for (const s of spreads) {
    if (s.massKg === 0) continue;
    if (s.toM - s.fromM < 1e-9) {
      // A spread narrower than a nanometre is a point load (and dividing by its width would overflow).
      const atM = (s.fromM + s.toM) / 2;
      const k = stretchOf(atM);
      stretches[k].points.push({ a: atM - bounds[k], kg: s.massKg });
      continue;
    }
    const kgPerM = s.massKg / (s.toM - s.fromM);
    for (let k = 0; k <= n; k++) {
      const c = Math.max(s.fromM, bounds[k]);
      const d = Math.min(s.toM, bounds[k + 1]);
      if (d > c) stretches[k].spreads.push({ c: c - bounds[k], d: d - bounds[k], kgPerM });
    }
  }

  const reactions = new Array<number>(n).fill(0);
  const moments = new Array<number>(n).fill(0);

  // Overhangs: everything on them hangs on the end line, and bends the batten over it (hogging, negative).
  const first = stretches[0];
  const overhang0 = xs[0];
  for (const p of first.points) {
    reactions[0] += p.kg;
    moments[0] -= p.kg * (overhang0 - p.a);
  }
  for (const s of first.spreads) {
    const kg = s.kgPerM * (s.d - s.c);
    reactions[0] += kg;
    moments[0] -= kg * (overhang0 - (s.c + s.d) / 2);
  }
  for (const p of stretches[n].points) {
    reactions[n - 1] += p.kg;
    moments[n - 1] -= p.kg * p.a;
  }
  for (const s of stretches[n].spreads) {
    const kg = s.kgPerM * (s.d - s.c);
    reactions[n - 1] += kg;
    moments[n - 1] -= kg * ((s.c + s.d) / 2);
  }

  // Per span: simply supported reactions, and the two load terms of the three-moment equation
  // (6·A·x̄/L of the free moment diagram, x̄ from the left end and from the right end).
  const spanL: number[] = [];
  const leftTerm: number[] = [];
  const rightTerm: number[] = [];
  const simpleLeft: number[] = [];
  const simpleRight: number[] = [];
  for (let j = 1; j < n; j++) {
    const L = xs[j] - xs[j - 1];
    let tl = 0;
    let tr = 0;
    let rl = 0;
    let rr = 0;
    for (const { a, kg } of stretches[j].points) {
      const b = L - a;
      tl += (kg * a * (L * L - a * a)) / L;
      tr += (kg * b * (L * L - b * b)) / L;
      rr += (kg * a) / L;
      rl += (kg * b) / L;
    }
    for (const { c, d, kgPerM } of stretches[j].spreads) {
      const kg = kgPerM * (d - c);
      tl += (kgPerM / L) * (ringIntegral(L, d) - ringIntegral(L, c));
      tr += (kgPerM / L) * (ringIntegral(L, L - c) - ringIntegral(L, L - d));
      const share = (kg * (c + d)) / 2 / L;
      rr += share;
      rl += kg - share;
    }
    spanL.push(L);
    leftTerm.push(tl);
    rightTerm.push(tr);
    simpleLeft.push(rl);
    simpleRight.push(rr);
  }

  // Inner lines: M[j-1]·L₁ + 2·M[j]·(L₁ + L₂) + M[j+1]·L₂ = −(term of span left from its left end + term of span right from its right end).
  const inner = n - 2;
  if (inner > 0) {
    const A = Matrix.zeros(inner, inner);
    const rhs = Matrix.zeros(inner, 1);
    for (let r = 0; r < inner; r++) {
      const j = r + 1;
      const L1 = spanL[j - 1];
      const L2 = spanL[j];
      A.set(r, r, 2 * (L1 + L2));
      let value = -(leftTerm[j - 1] + rightTerm[j]);
      if (r > 0) A.set(r, r - 1, L1);
      else value -= moments[0] * L1;
      if (r < inner - 1) A.set(r, r + 1, L2);
      else value -= moments[n - 1] * L2;
      rhs.set(r, 0, value);
    }
    const solved = solve(A, rhs);
    for (let r = 0; r < inner; r++) moments[r + 1] = solved.get(r, 0);
  }

  // Each span passes its simple reactions plus the shear from the difference of its end moments.
  for (let j = 1; j < n; j++) {
    const shear = (moments[j] - moments[j - 1]) / spanL[j - 1];
    reactions[j - 1] += simpleLeft[j - 1] + shear;
    reactions[j] += simpleRight[j - 1] - shear;
  }

  const result = new Array<number>(n);
  order.forEach((o, sorted) => {
    result[o.i] = reactions[sorted];
  });
  return result;
}
