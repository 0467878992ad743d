import { onMounted, ref, type Ref } from 'vue';
import { failureMessage } from '@/services/http';

/**
 * What a page reads once when it opens: the answer, or the sentence to show in its place. `loaded`
 * turns true either way, so a page can tell "nothing there" from "still asking".
 */
export function useLoadOnMount<T>(load: () => Promise<T>): { data: Ref<T | null>; error: Ref<string | null>; loaded: Ref<boolean> } {
  const data = ref<T | null>(null) as Ref<T | null>;
  const error = ref<string | null>(null);
  const loaded = ref(false);
  onMounted(async () => {
    try {
      data.value = await load();
    } catch (failure) {
      error.value = failureMessage(failure);
    } finally {
      loaded.value = true;
    }
  });
  return { data, error, loaded };
}
