import { registerSW } from 'virtual:pwa-register';

/**
 * Registers the service worker that keeps the app shell on the phone (vite-plugin-pwa, Workbox).
 * A new version takes over on the next start; nothing reloads under a person mid-session.
 */
export function bootInstallableApp(): void {
  if (!('serviceWorker' in navigator)) return;
  registerSW({ immediate: true });
}
