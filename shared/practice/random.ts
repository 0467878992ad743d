/**
 * Seeded randomness for the simulated crew, from pure-rand (the generator fast-check uses), so a
 * practice run can be played again from its seed and property tests are reproducible.
 */
import { uniformFloat64 } from 'pure-rand/distribution/uniformFloat64';
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';

export interface Random {
  /** A number in [0, 1). */
  next(): number;
}

export function seededRandom(seed: number): Random {
  // Neighbouring small seeds start alike in xoroshiro: spread the seed, then skip the first draws.
  const rng = xoroshiro128plus(Math.imul((seed | 0) ^ 0x2545f491, 0x9e3779b1));
  for (let i = 0; i < 8; i += 1) uniformFloat64(rng);
  return { next: () => uniformFloat64(rng) };
}

/** A delay around `medianMs`, skewed long like people's reaction times (log-normal, sigma 0.35). */
export function humanDelayMs(random: Random, medianMs: number): number {
  // Box-Muller: one standard normal draw from two uniform ones.
  const u = Math.max(random.next(), 1e-9);
  const z = Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * random.next());
  return Math.round(medianMs * Math.exp(0.35 * z));
}
