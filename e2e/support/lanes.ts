import { tmpdir } from 'node:os';
import { join } from 'node:path';

/**
 * Each spec file gets a lane: its own app on its own port with a fresh database seeded with the
 * demo venue, so one spec's loading session cannot change what another spec sees. The `first-run`
 * lane is the exception: the real server process (server/index.ts) on an empty database without the
 * demo, its console written to FIRST_RUN_LOG, where the spec reads the setup code it printed.
 */
export const LANES = ['sign-in', 'session', 'offline', 'a11y', 'practice', 'phone-app', 'spoken-calls', 'record', 'mail', 'screens-dark', 'screens-light', 'schedule', 'planner-slack', 'sign-in-edges', 'time-zone', 'first-run', 'crew-calls'] as const;
export type Lane = (typeof LANES)[number];

export const E2E_BASE_PORT = Number(process.env.RAILCALL_E2E_PORT ?? 4310);

export function laneUrl(lane: Lane): string {
  return `http://127.0.0.1:${E2E_BASE_PORT + LANES.indexOf(lane)}`;
}

/** The console of the first-run lane's server process (it prints the one-time setup code there). */
export const FIRST_RUN_LOG = join(tmpdir(), `railcall-e2e-${E2E_BASE_PORT}-first-run.log`);
