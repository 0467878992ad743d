/**
 * Benchmark for the rigging calculations, against their budgets:
 * planChange for 20 pieces and 4 brick types under 5 ms; liftLineLoads for 8 lift lines and 50 loads under 1 ms;
 * slackAwareLiftLineLoads for the same with a heavy load at one end (lines go slack) under 2 ms.
 * Run: node --import tsx scripts/bench/rigging.ts. Prints p50 and p99 per case and the ratio to the budget.
 */
import { performance } from 'node:perf_hooks';
import { lbToKg, liftLineLoads, planChange, slackAwareLiftLineLoads, type LiftLineLoadsInput, type PlanInput } from '../../shared/rigging/index';

/** A small seeded generator, so every run measures the same inputs. */
function random(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s * 1664525 + 1013904223) >>> 0;
    return s / 2 ** 32;
  };
}

function planCase(rand: () => number): PlanInput {
  const brickTypes = [
    { type: 'full', massKg: lbToKg(25) },
    { type: 'half', massKg: lbToKg(12.5) },
    { type: 'quarter', massKg: lbToKg(6.25) },
    { type: 'slab', massKg: lbToKg(20) },
  ];
  // 10 pieces come off, 10 go on: 20 pieces planned, drapes to trusses (10 to 120 kg).
  const pieces = Array.from({ length: 10 }, (_, i) => ({ id: `old-${i}`, massKg: 10 + rand() * 110 }));
  const add = Array.from({ length: 10 }, (_, i) => ({ id: `new-${i}`, massKg: 10 + rand() * 110 }));
  const bricks = { full: 60, half: 20, quarter: 10, slab: 10 };
  const arborKg = 40;
  const arborSide = arborKg + 60 * lbToKg(25) + 20 * lbToKg(12.5) + 10 * lbToKg(6.25) + 10 * lbToKg(20);
  const hung = pieces.reduce((s, p) => s + p.massKg, 0);
  return {
    purchase: 1,
    pipeKg: Math.max(30, arborSide - hung) + rand() * 5,
    arborKg,
    pieces,
    bricks,
    brickTypes,
    bridgeStock: { full: 40, half: 20, quarter: 20, slab: 10 },
    remove: pieces.map((p) => p.id),
    add,
    ropeLockLimitKg: lbToKg(50),
  };
}

function beamCase(rand: () => number): LiftLineLoadsInput {
  const lengthM = 15;
  return {
    lengthM,
    liftLinesM: Array.from({ length: 8 }, (_, i) => 0.5 + (i * (lengthM - 1)) / 7),
    selfMassKgPerM: 4.05,
    pointLoads: Array.from({ length: 30 }, () => ({ atM: rand() * lengthM, massKg: rand() * 40 })),
    spreadLoads: Array.from({ length: 20 }, () => {
      const a = rand() * lengthM;
      const b = rand() * lengthM;
      return { fromM: Math.min(a, b), toM: Math.max(a, b), massKg: rand() * 60 };
    }),
  };
}

function measure(name: string, budgetMs: number, make: (rand: () => number) => () => unknown, runs: number): void {
  const rand = random(11);
  const cases = Array.from({ length: 64 }, () => make(rand));
  for (let i = 0; i < 200; i++) cases[i % cases.length](); // warm up the JIT
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const run = cases[i % cases.length];
    const start = performance.now();
    run();
    times.push(performance.now() - start);
  }
  times.sort((a, b) => a - b);
  const at = (q: number) => times[Math.min(times.length - 1, Math.floor(q * times.length))];
  const p50 = at(0.5);
  const p99 = at(0.99);
  console.log(
    `${name}: p50 ${p50.toFixed(4)} ms, p99 ${p99.toFixed(4)} ms; budget ${budgetMs} ms ` +
      `(p50 ${(p50 / budgetMs).toFixed(3)}x, p99 ${(p99 / budgetMs).toFixed(3)}x of budget)`,
  );
}

measure('planChange (20 pieces, 4 brick types)', 5, (rand) => {
  const input = planCase(rand);
  return () => planChange(input);
}, 2000);
measure('liftLineLoads (8 lift lines, 50 loads)', 1, (rand) => {
  const input = beamCase(rand);
  return () => liftLineLoads(input);
}, 20000);
measure('slackAwareLiftLineLoads (8 lift lines, 50 loads, 300 kg at one end)', 2, (rand) => {
  const input = beamCase(rand);
  // A heavy piece on the end overhang: the rigid solution pushes the lines near it, which go slack.
  input.pointLoads!.push({ atM: 0, massKg: 300 });
  return () => slackAwareLiftLineLoads(input);
}, 20000);
