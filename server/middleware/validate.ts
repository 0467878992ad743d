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

/** Parses input with a shared schema; unknown keys are stripped, problems answered as one 400. */
export function parseInput<S extends z.ZodType>(schema: S, input: unknown, what = 'request'): z.infer<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const fields = fieldErrors(result.error);
  const summary = Object.entries(fields)
    .map(([field, messages]) => (field === '_' ? messages.join('; ') : `${field}: ${messages.join('; ')}`))
    .join('. ');
  throw new HttpError('bad-input', `The ${what} is not valid. ${summary}`.trim(), fields);
}

export const idParam = z.object({ id: z.coerce.number().int().positive('Not a valid id') });
