import { failureMessage } from '@/services/http';
import { useNoticesStore, type NoticeKind } from '@/stores/notices';

/**
 * Feedback in plain words, shown by components/NoticeStack in the screen's flow. Plain functions,
 * so route guards (outside any component) can use them too once pinia is installed.
 */
export function useNotice() {
  const push = (kind: NoticeKind, message: string, tag?: string) => useNoticesStore().push(kind, message, { tag });
  return {
    failure(error: unknown, tag?: string): void {
      push('negative', failureMessage(error), tag);
    },
    success(message: string, tag?: string): void {
      push('positive', message, tag);
    },
    info(message: string, tag?: string): void {
      push('info', message, tag);
    },
    warning(message: string, tag?: string): void {
      push('warning', message, tag);
    },
  };
}
