import { defineConfig } from '@playwright/test';
import { E2E_BASE_PORT, LANES, laneUrl } from './support/lanes';

// Debian's chromium, never a downloaded browser. The flags keep it off the (closed) network.
const CHROMIUM_ARGS = [
  '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update',
  '--disable-sync', '--no-first-run', '--disable-quic',
];

export default defineConfig({
  testDir: '.',
  testMatch: '*.spec.ts',
  outputDir: './output',
  // Two cores: one browser at a time; the specs open several contexts each.
  workers: 1,
  fullyParallel: false,
  retries: 0,
  // A stray .only would run a few tests and report green.
  forbidOnly: true,
  timeout: 90_000,
  expect: { timeout: 10_000 },
  use: {
    // Specs of other lanes set their own with test.use({ baseURL: laneUrl('...') }).
    baseURL: laneUrl('sign-in'),
    viewport: { width: 360, height: 740 },
    hasTouch: true,
    colorScheme: 'dark',
    launchOptions: { executablePath: '/usr/bin/chromium', args: CHROMIUM_ARGS },
    trace: 'retain-on-failure',
    screenshot: 'only-on-failure',
  },
  projects: [{ name: 'phone', use: { browserName: 'chromium' } }],
  webServer: {
    command: 'node --import tsx e2e/support/serve.ts',
    cwd: '..',
    url: `http://127.0.0.1:${E2E_BASE_PORT + LANES.length - 1}/sign-in`,
    reuseExistingServer: false,
    timeout: 120_000,
    stdout: 'pipe',
  },
});
