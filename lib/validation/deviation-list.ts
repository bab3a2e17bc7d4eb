import { z } from 'zod';
import { classifications } from '../risk/classify';
import { deviationStates } from '../../workflows/states';
import { parseInput } from './parse';

/*
 * The deviation list's state as it sits in the URL: paging, sorting and filters, every value a string
 * (repeated keys or comma lists for the multi-value filters). A page reading its own URL wants any
 * hand-edited or stale value to fall back to its default; the JSON API wants to tell the caller what
 * was wrong, so both readings share one set of field schemas.
 */

export const deviationListSorts = ['number', 'raised', 'due', 'rpn', 'status', 'classification'] as const;
export type DeviationListSort = (typeof deviationListSorts)[number];
export const sortDirections = ['asc', 'desc'] as const;
export type SortDirection = (typeof sortDirections)[number];

export const deviationListDefaults = { page: 1, pageSize: 50, sort: 'raised', dir: 'desc' } as const;

type Raw = string | string[] | undefined | null;

/** A scalar parameter: the first of repeated keys; blank means "not given". */
function scalar(v: unknown): unknown {
  const x = Array.isArray(v) ? v[0] : v;
  return x === '' || x === null ? undefined : x;
}

/** A multi-value parameter: repeated keys and comma lists both read as one list; blanks dropped. */
function list(v: unknown): unknown {
  if (v === undefined || v === null) return undefined;
  const parts = (Array.isArray(v) ? v : [v]).flatMap((x) => (typeof x === 'string' ? x.split(',') : [x]));
  const kept = parts.filter((x) => x !== '');
  return kept.length === 0 ? undefined : kept;
}

const id = (label: string) =>
  z.preprocess(
    scalar,
    z.coerce
      .number({ error: `${label} must be a record id.` })
      .int({ error: `${label} must be a record id.` })
      .positive({ error: `${label} must be a record id.` })
      .max(2_147_483_647, { error: `${label} must be a record id.` })
      .nullable()
      .default(null),
  );

const isoDate = (label: string) =>
  z.preprocess(
    scalar,
    z
      .string()
      .regex(/^\d{4}-\d{2}-\d{2}$/, { error: `${label} must be a date (YYYY-MM-DD).` })
      .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), {
        error: `${label} is not a calendar date.`,
      })
      .nullable()
      .default(null),
  );

const truthy = ['true', '1', 'yes', 'on'];
const falsy = ['false', '0', 'no', 'off'];

export const deviationListQueryShape = {
  page: z.preprocess(
    scalar,
    z.coerce
      .number({ error: 'Page must be a whole number from 1.' })
      .int({ error: 'Page must be a whole number from 1.' })
      .min(1, { error: 'Page must be a whole number from 1.' })
      .max(100_000, { error: 'Page must be at most 100000.' })
      .default(deviationListDefaults.page),
  ),
  pageSize: z.preprocess(
    scalar,
    z.coerce
      .number({ error: 'Page size must be a whole number from 10 to 100.' })
      .int({ error: 'Page size must be a whole number from 10 to 100.' })
      .min(10, { error: 'Page size must be a whole number from 10 to 100.' })
      .max(100, { error: 'Page size must be a whole number from 10 to 100.' })
      .default(deviationListDefaults.pageSize),
  ),
  sort: z.preprocess(
    scalar,
    z.enum(deviationListSorts, { error: `Sort by one of: ${deviationListSorts.join(', ')}.` }).default(deviationListDefaults.sort),
  ),
  dir: z.preprocess(scalar, z.enum(sortDirections, { error: 'Direction is asc or desc.' }).default(deviationListDefaults.dir)),
  status: z.preprocess(
    list,
    z.array(z.enum(deviationStates, { error: `Status is one or more of: ${deviationStates.join(', ')}.` })).default([]),
  ),
  classification: z.preprocess(
    list,
    z.array(z.enum(classifications, { error: `Classification is one or more of: ${classifications.join(', ')}.` })).default([]),
  ),
  productId: id('Product'),
  batchId: id('Batch'),
  /** The batch by its lot number, as an operator would type or scan it. */
  lot: z.preprocess(
    (v) => {
      const x = scalar(v);
      return typeof x === 'string' ? x.trim() || undefined : x;
    },
    z.string().max(40, { error: 'Lot number is at most 40 characters.' }).nullable().default(null),
  ),
  machineId: id('Machine'),
  ringId: id('Filling ring'),
  defectId: id('Defect'),
  ownerId: id('Owner'),
  raisedFrom: isoDate('Raised from'),
  raisedTo: isoDate('Raised to'),
  overdue: z.preprocess(
    (v) => {
      const x = scalar(v);
      if (typeof x !== 'string') return x;
      const lower = x.toLowerCase();
      return truthy.includes(lower) ? true : falsy.includes(lower) ? false : x;
    },
    z.boolean({ error: 'Overdue is true or false.' }).default(false),
  ),
};

type Shape = typeof deviationListQueryShape;
type Lenient = { [K in keyof Shape]: z.ZodCatch<Shape[K]> };

/** Strict reading, for the API: a bad value is a 422 with a message beside the field. */
export const deviationListQueryStrictSchema = z.object(deviationListQueryShape);

/** Lenient reading, for pages: each unreadable value falls back to its default on its own. */
export const deviationListQuerySchema = z.object(
  Object.fromEntries(
    Object.entries(deviationListQueryShape).map(([key, schema]) => [key, (schema as z.ZodType).catch(() => schema.parse(undefined))]),
  ) as Lenient,
);

export type DeviationListQuery = z.output<typeof deviationListQueryStrictSchema>;

export type SearchParamsLike = URLSearchParams | Record<string, Raw>;

function toRecord(params: SearchParamsLike): Record<string, Raw> {
  if (!(params instanceof URLSearchParams)) return params;
  const out: Record<string, string[]> = {};
  for (const [key, value] of params.entries()) (out[key] ??= []).push(value);
  return out;
}

/** A page's query from its URL; never throws. */
export function parseDeviationListQuery(params: SearchParamsLike): DeviationListQuery {
  return deviationListQuerySchema.parse(toRecord(params));
}

/** The API's query; throws ValidationError (422 through `respond`) naming each bad field. */
export function parseDeviationListQueryStrict(params: SearchParamsLike): DeviationListQuery {
  return parseInput(deviationListQueryStrictSchema, toRecord(params));
}
