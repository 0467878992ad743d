import { fileURLToPath, URL } from 'node:url';
import { defineConfig } from 'vitest/config';
import vue from '@vitejs/plugin-vue';
import { quasar, transformAssetUrls } from '@quasar/vite-plugin';
import { VitePWA } from 'vite-plugin-pwa';

const apiTarget = `http://127.0.0.1:${process.env.RAILCALL_PORT ?? '3000'}`;

/**
 * The installable app: the manifest, and a service worker (Workbox) that keeps the app shell and the
 * Inter font on the phone, so a phone that lost its signal in the fly gallery still opens. The API and
 * Socket.IO are never cached by it: live state comes from the server, or from the phone's own copy.
 */
const installableApp = VitePWA({
  registerType: 'autoUpdate',
  // Registered in src/boot/pwa.ts, once the app has started.
  injectRegister: false,
  includeAssets: ['favicon.svg', 'icons/apple-touch-icon.png'],
  manifest: {
    name: 'Railcall',
    short_name: 'Railcall',
    description: 'Loading sessions for manual counterweight fly systems: called, answered and logged.',
    lang: 'en',
    start_url: '/',
    scope: '/',
    display: 'standalone',
    orientation: 'portrait',
    background_color: '#121212',
    theme_color: '#1b2a3d',
    icons: [
      { src: '/icons/railcall-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
      { src: '/icons/railcall-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
      { src: '/icons/railcall-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
      { src: '/icons/railcall.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' },
    ],
  },
  workbox: {
    globPatterns: ['**/*.{js,css,html,svg,png,woff2}'],
    navigateFallback: '/index.html',
    navigateFallbackDenylist: [/^\/api\//, /^\/socket\.io\//],
    cleanupOutdatedCaches: true,
  },
});

export default defineConfig({
  plugins: [vue({ template: { transformAssetUrls } }), quasar({ sassVariables: false }), ...(process.env.VITEST ? [] : [installableApp])],
  resolve: {
    alias: {
      '@shared': fileURLToPath(new URL('./shared', import.meta.url)),
      '@': fileURLToPath(new URL('./src', import.meta.url)),
    },
  },
  build: { outDir: 'dist', emptyOutDir: true, chunkSizeWarningLimit: 600 },
  // `npm run dev`: Vite serves the client and hands the API and Socket.IO to the Express server.
  server: {
    port: 5173,
    proxy: {
      '/api': apiTarget,
      '/socket.io': { target: apiTarget, ws: true },
    },
  },
  test: {
    // A stray .only would run a few tests and report green.
    allowOnly: false,
    // One MariaDB for the whole run (started by scripts/test.mjs); each file makes its own database.
    projects: [
      {
        extends: true,
        test: {
          name: 'node',
          environment: 'node',
          include: ['tests/shared/**/*.test.ts', 'tests/server/**/*.test.ts', 'tests/scripts/**/*.test.ts'],
          // Property tests of thousands of random line sets take seconds alone, many times that on a busy machine.
          testTimeout: 120_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'client',
          environment: 'happy-dom',
          include: ['tests/client/**/*.test.ts'],
          server: { deps: { inline: ['quasar'] } },
        },
      },
    ],
  },
});
