/**
 * Each spec file gets a lane: its own app on its own port with a fresh database seeded with the
 * demo venue, so one spec's loading session cannot change what another spec sees.
 */
export const LANES = ['sign-in', 'session', 'offline', 'a11y', 'practice', 'phone-app', 'spoken-calls', 'record', 'mail', 'screens-dark', 'screens-light', 'schedule', 'planner-slack', 'sign-in-edges', 'time-zone'] as const;
export type Lane = (typeof LANES)[number];

export const E2E_BASE_PORT = Number(process.env.RAILCALL_E2E_PORT ?? 4310);

export function laneUrl(lane: Lane): string {
  return `http://127.0.0.1:${E2E_BASE_PORT + LANES.indexOf(lane)}`;
}
