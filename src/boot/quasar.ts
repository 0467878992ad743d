import type { App } from 'vue';
import { Dialog, Notify, Quasar } from 'quasar';
import iconSet from 'quasar/icon-set/svg-material-icons';
import 'quasar/dist/quasar.css';

/** Quasar with SVG icons (no icon font to download) and notices at the top, clear of thumbs. */
export function bootQuasar(app: App): void {
  app.use(Quasar, {
    plugins: { Notify, Dialog },
    iconSet,
    config: {
      dark: true,
      notify: { position: 'top', progress: true },
    },
  });
}
