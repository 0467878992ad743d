import type { App } from 'vue';
import { createPinia } from 'pinia';

export function bootPinia(app: App): void {
  app.use(createPinia());
}
