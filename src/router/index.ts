import { createRouter, createWebHistory, type Router } from 'vue-router';
import { useAuthStore } from '@/stores/auth';
import { useNotice } from '@/composables/useNotice';
import { getSetupStatus } from '@/services/api';
import { decideAccess, SIGN_IN_PATH } from './access';
import { routes } from './routes';

export function createAppRouter(): Router {
  const router = createRouter({
    history: createWebHistory(import.meta.env.BASE_URL),
    routes,
    scrollBehavior: () => ({ top: 0 }),
  });

  // Asked once per page load: an install with no venue yet sends everyone to first-run setup.
  let setupNeeded: boolean | null = null;

  router.beforeEach(async (to) => {
    // Inside the guard, never at module top: pinia is installed by then (pinia docs).
    const auth = useAuthStore();
    if (!auth.loaded) await auth.load().catch(() => undefined);
    if (!auth.signedIn) {
      setupNeeded ??= await getSetupStatus().then((s) => s.needed, () => false);
      if (setupNeeded && to.name !== 'setup') return { name: 'setup' };
      if (!setupNeeded && to.name === 'setup') return SIGN_IN_PATH;
    } else {
      setupNeeded = false;
    }
    const decision = decideAccess(to, auth.signedIn ? auth.roles : null);
    if (decision.allow) return true;
    if (decision.notice) useNotice().info(decision.notice);
    return decision.redirect;
  });

  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Railcall` : 'Railcall';
  });

  return router;
}
