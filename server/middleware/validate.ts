import { z } from 'zod';
import { HttpError } from './http-error';

/** Collects every problem of a failed parse, by field, in the schema's own words. */
export function fieldErrors(error: z.ZodError): Record<string, string[]> {
  const fields: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_';
    (fields[key] ??= []).push(issue.message);
  }
  return fields;
}

/** A field path in words: `envelope.clientTimeMs` -> "client time", `roles.0` -> "roles". */
export function fieldLabel(path: string): string {
  const name = path.split('.').filter((part) => !/^\d+$/.test(part)).at(-1) ?? '';
  return name.replace(/Ms$|Kg$|M$/, '').replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase();
}

/** "a", "a and b", "a, b and c". */
function wordList(words: string[]): string {
  return words.length <= 1 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words.at(-1)}`;
}

/**
 * Parses input with a shared schema; unknown keys are stripped, problems answered as one 400.
 * The answer keeps every field path with the schema's words (`fields`, for forms and programs) and
 * says in one sentence what to look at (`message`, for people).
 */
export function parseInput<S extends z.ZodType>(schema: S, input: unknown, what = 'request'): z.infer<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const fields = fieldErrors(result.error);
  const labels = [...new Set(Object.keys(fields).filter((f) => f !== '_').map(fieldLabel).filter(Boolean))];
  const sentence = labels.length
    ? `The ${what} is not valid: check the ${wordList(labels)}, then try again.`
    : `The ${what} is not valid. Reload the page and try again.`;
  throw new HttpError('bad-input', sentence, fields);
}

export const idParam = z.object({ id: z.coerce.number().int().positive('Not a valid id') });
