/** The balance of a line set, judged at the batten. */
import type { Purchase } from './types';

/**
 * Imbalance in kg at the batten: batten side − arbor side ÷ purchase. Positive = pipe-heavy.
 * Double purchase (2:1) means the arbor carries twice what it balances.
 */
export function imbalanceKg({
  battenSideKg,
  arborSideKg,
  purchase,
}: {
  battenSideKg: number;
  arborSideKg: number;
  purchase: Purchase;
}): number {
  return battenSideKg - arborSideKg / purchase;
}

/** Arbor-side kg that balances `battenKg` on the batten: twice as much on double purchase. */
export function balancingArborKg(battenKg: number, purchase: Purchase): number {
  return battenKg * purchase;
}
