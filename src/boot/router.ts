import type { App } from 'vue';
import { createAppRouter } from '@/router';

/** Installing the router starts the first navigation, so the auth store must be loaded first. */
export function bootRouter(app: App): void {
  app.use(createAppRouter());
}
