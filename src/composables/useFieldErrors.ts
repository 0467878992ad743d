import { ref } from 'vue';
import type { z } from 'zod';
import { ApiFailure } from '@/services/http';

/**
 * Field messages for a form, from the shared zod schema (before sending) or from the
 * server's bad-input answer (after), so both sides speak with the same words.
 */
export function useFieldErrors<Field extends string>() {
  const errors = ref<Partial<Record<Field, string>>>({});

  function clear(): void {
    errors.value = {};
  }

  /** Parses with the schema; on failure fills the messages and answers null. */
  function check<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> | null {
    const result = schema.safeParse(value);
    if (result.success) {
      clear();
      return result.data;
    }
    const next: Partial<Record<Field, string>> = {};
    for (const issue of result.error.issues) {
      const field = String(issue.path[0] ?? '') as Field;
      if (field && !next[field]) next[field] = issue.message;
    }
    errors.value = next;
    return null;
  }

  /** Takes the server's field messages, if the failure has any; answers whether it did. */
  function takeFrom(error: unknown): boolean {
    if (!(error instanceof ApiFailure) || Object.keys(error.fields).length === 0) return false;
    const next: Partial<Record<Field, string>> = {};
    for (const [field, messages] of Object.entries(error.fields)) {
      if (messages[0]) next[field as Field] = messages[0];
    }
    errors.value = next;
    return true;
  }

  return { errors, clear, check, takeFrom };
}
