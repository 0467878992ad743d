import { tmpdir } from 'node:os';
import { join } from 'node:path';

/**
 * Each spec file gets a lane: its own app on its own port with a fresh database seeded with the
 * demo venue, so one spec's loading session cannot change what another spec sees. The first-run
 * lanes (one per screen size, as setup works once) are the exception: the real server process
 * (server/index.ts) on an empty database without the demo, its console written to firstRunLog(lane),
 * where the spec reads the setup code it printed.
 */
export const LANES = ['sign-in', 'session', 'offline', 'a11y', 'practice', 'phone-app', 'spoken-calls', 'record', 'mail', 'screens-dark', 'screens-light', 'schedule', 'planner-slack', 'sign-in-edges', 'time-zone', 'first-run', 'crew-calls', 'first-run-wide'] as const;
export type Lane = (typeof LANES)[number];

export const E2E_BASE_PORT = Number(process.env.RAILCALL_E2E_PORT ?? 4310);

export function laneUrl(lane: Lane): string {
  return `http://127.0.0.1:${E2E_BASE_PORT + LANES.indexOf(lane)}`;
}

export const FIRST_RUN_LANES = ['first-run', 'first-run-wide'] as const satisfies readonly Lane[];
export type FirstRunLane = (typeof FIRST_RUN_LANES)[number];

/** The console of a first-run lane's server process (it prints the one-time setup code there). */
export function firstRunLog(lane: FirstRunLane): string {
  return join(tmpdir(), `railcall-e2e-${E2E_BASE_PORT}-${lane}.log`);
}
