import type { App } from 'vue';
import { Dialog, Quasar } from 'quasar';
import iconSet from 'quasar/icon-set/svg-material-icons';
import 'quasar/dist/quasar.css';

/** Quasar with SVG icons (no icon font to download); notices are Railcall's own (components/NoticeStack). */
export function bootQuasar(app: App): void {
  app.use(Quasar, {
    plugins: { Dialog },
    iconSet,
    config: {
      dark: true,
    },
  });
}
