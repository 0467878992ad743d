import { Notify } from 'quasar';
import { failureMessage } from '@/services/http';

/**
 * Feedback in plain words through Quasar Notify. Plain functions, so route guards
 * (outside any component) can use them too.
 */
export function useNotice() {
  return {
    failure(error: unknown): void {
      Notify.create({ type: 'negative', message: failureMessage(error), timeout: 6000, actions: [{ label: 'Dismiss', flat: true }] });
    },
    success(message: string): void {
      Notify.create({ type: 'positive', message, timeout: 3000 });
    },
    info(message: string): void {
      Notify.create({ type: 'info', message, timeout: 4000 });
    },
  };
}
