import { createApp } from 'vue';
import App from './App.vue';
import { bootQuasar } from './boot/quasar';
import { bootPinia } from './boot/pinia';
import { bootRouter } from './boot/router';
import { bootInstallableApp } from './boot/pwa';
import './boot/font';
import './css/app.css';
import { useAuthStore } from './stores/auth';
import { useThemeStore } from './stores/theme';

async function start(): Promise<void> {
  const app = createApp(App);
  bootQuasar(app);
  bootPinia(app);
  useThemeStore();
  // Who is signed in decides the first screen, so ask before the router starts.
  await useAuthStore().load().catch(() => undefined);
  bootRouter(app);
  app.mount('#app');
  bootInstallableApp();
}

void start();
