import { z } from 'zod';
import { ValidationError } from '../errors';

/** Parses with the schema or throws ValidationError carrying zod's per-field messages. Pure. */
export function parseInput<S extends z.ZodType>(schema: S, raw: unknown): z.output<S> {
  const result = schema.safeParse(raw);
  if (result.success) return result.data;
  const flat = z.flattenError(result.error);
  const fieldErrors = Object.fromEntries(
    Object.entries(flat.fieldErrors).filter((e): e is [string, string[]] => Array.isArray(e[1]) && e[1].length > 0),
  );
  throw new ValidationError(flat.formErrors[0] ?? 'Check the highlighted fields.', fieldErrors);
}
