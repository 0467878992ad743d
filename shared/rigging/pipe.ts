/**
 * Batten pipe self-weight. The formula is the one behind the ASME B36.10M weight column:
 * mass per length = density × π × (OD − t) × t, the area of a thin ring at its mean diameter (exact for a tube).
 */

/** Carbon steel, the density the ASME B36.10M weights assume. */
export const STEEL_DENSITY_KG_M3 = 7850;

/** Mass of a round tube per metre of length, in kg/m. Diameters and wall in millimetres. */
export function pipeMassPerMetre({
  outsideDiameterMm,
  wallMm,
  densityKgM3 = STEEL_DENSITY_KG_M3,
}: {
  outsideDiameterMm: number;
  wallMm: number;
  densityKgM3?: number;
}): number {
  if (!(outsideDiameterMm > 0) || !(wallMm > 0) || 2 * wallMm > outsideDiameterMm) {
    throw new RangeError('A pipe needs a positive diameter and a wall no thicker than its radius.');
  }
  // (OD − t) × t in mm² → m² is 1e-6.
  return densityKgM3 * Math.PI * (outsideDiameterMm - wallMm) * wallMm * 1e-6;
}

/** A common batten pipe size, for the line set form. */
export interface PipeSize {
  /** What a crew calls it, e.g. "1-1/2 in Schedule 40". */
  label: string;
  nps: string;
  schedule: '40' | '80';
  outsideDiameterMm: number;
  wallMm: number;
}

const IN_TO_MM = 25.4;
const size = (nps: string, schedule: '40' | '80', odIn: number, wallIn: number): PipeSize => ({
  label: `${nps} in Schedule ${schedule}`,
  nps,
  schedule,
  outsideDiameterMm: odIn * IN_TO_MM,
  wallMm: wallIn * IN_TO_MM,
});

/**
 * Common batten pipe sizes (ASME B36.10M dimensions; NPS 1-1/2 Schedule 40 is the theatre's usual batten).
 * Mass per metre comes from `pipeMassPerMetre`, so the table holds dimensions only.
 */
export const BATTEN_PIPE_SIZES: readonly PipeSize[] = [
  size('1-1/4', '40', 1.66, 0.14),
  size('1-1/4', '80', 1.66, 0.191),
  size('1-1/2', '40', 1.9, 0.145),
  size('1-1/2', '80', 1.9, 0.2),
  size('2', '40', 2.375, 0.154),
  size('2', '80', 2.375, 0.218),
];
