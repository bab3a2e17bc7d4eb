import { z } from 'zod';
import { capaSources } from '../../workflows/capa-terms';
import { capaStates } from '../../workflows/states';
import { parseInput } from '../validation/parse';

/*
 * The CAPA list's state as it sits in the URL: paging, sorting and filters. The page reads its URL
 * leniently (an unreadable value falls back to its default); the JSON API reads it strictly and says
 * which parameter is wrong. Pure: the client writes the same shape back into the URL.
 */

export const capaListSorts = ['number', 'created', 'due', 'status'] as const;
export type CapaListSort = (typeof capaListSorts)[number];
export const capaListDefaults = { page: 1, pageSize: 50, sort: 'created', dir: 'desc' } as const;

function scalar(v: unknown): unknown {
  const x = Array.isArray(v) ? v[0] : v;
  return x === '' || x === null ? undefined : x;
}

function list(v: unknown): unknown {
  if (v === undefined || v === null) return undefined;
  const parts = (Array.isArray(v) ? v : [v]).flatMap((x) => (typeof x === 'string' ? x.split(',') : [x]));
  const kept = parts.filter((x) => x !== '');
  return kept.length === 0 ? undefined : kept;
}

const whole = (message: string, min: number, max: number, fallback: number) =>
  z.preprocess(scalar, z.coerce.number({ error: message }).int({ error: message }).min(min, { error: message }).max(max, { error: message }).default(fallback));

const shape = {
  page: whole('Page must be a whole number from 1.', 1, 100_000, capaListDefaults.page),
  pageSize: whole('Page size must be a whole number from 10 to 100.', 10, 100, capaListDefaults.pageSize),
  sort: z.preprocess(scalar, z.enum(capaListSorts, { error: `Sort by one of: ${capaListSorts.join(', ')}.` }).default(capaListDefaults.sort)),
  dir: z.preprocess(scalar, z.enum(['asc', 'desc'], { error: 'Direction is asc or desc.' }).default(capaListDefaults.dir)),
  status: z.preprocess(list, z.array(z.enum(capaStates, { error: `Status is one or more of: ${capaStates.join(', ')}.` })).default([])),
  source: z.preprocess(list, z.array(z.enum(capaSources, { error: `Source is one or more of: ${capaSources.join(', ')}.` })).default([])),
  ownerId: z.preprocess(
    scalar,
    z.coerce.number({ error: 'Owner must be a user id.' }).int({ error: 'Owner must be a user id.' }).positive({ error: 'Owner must be a user id.' }).max(2_147_483_647).nullable().default(null),
  ),
  overdue: z.preprocess((v) => {
    const x = scalar(v);
    if (typeof x !== 'string') return x;
    return ['true', '1', 'yes', 'on'].includes(x.toLowerCase()) ? true : ['false', '0', 'no', 'off'].includes(x.toLowerCase()) ? false : x;
  }, z.boolean({ error: 'Overdue is true or false.' }).default(false)),
};

type Shape = typeof shape;
const strictSchema = z.object(shape);
const lenientSchema = z.object(
  Object.fromEntries(Object.entries(shape).map(([k, s]) => [k, (s as z.ZodType).catch(() => s.parse(undefined))])) as {
    [K in keyof Shape]: z.ZodCatch<Shape[K]>;
  },
);

export type CapaListQuery = z.output<typeof strictSchema>;
type Raw = string | string[] | undefined | null;
export type SearchParamsLike = URLSearchParams | Record<string, Raw>;

function toRecord(params: SearchParamsLike): Record<string, Raw> {
  if (!(params instanceof URLSearchParams)) return params;
  const out: Record<string, string[]> = {};
  for (const [key, value] of params.entries()) (out[key] ??= []).push(value);
  return out;
}

/** A page's query from its URL; never throws. */
export function parseCapaListQuery(params: SearchParamsLike): CapaListQuery {
  return lenientSchema.parse(toRecord(params));
}

/** The API's query; throws ValidationError (422) naming each bad parameter. */
export function parseCapaListQueryStrict(params: SearchParamsLike): CapaListQuery {
  return parseInput(strictSchema, toRecord(params));
}

/** The query written back into a URL, defaults left out so the plain address is the default view. */
export function capaListSearch(query: CapaListQuery): string {
  const params = new URLSearchParams();
  if (query.page !== capaListDefaults.page) params.set('page', String(query.page));
  if (query.pageSize !== capaListDefaults.pageSize) params.set('pageSize', String(query.pageSize));
  if (query.sort !== capaListDefaults.sort || query.dir !== capaListDefaults.dir) {
    params.set('sort', query.sort);
    params.set('dir', query.dir);
  }
  for (const s of query.status) params.append('status', s);
  for (const s of query.source) params.append('source', s);
  if (query.ownerId !== null) params.set('ownerId', String(query.ownerId));
  if (query.overdue) params.set('overdue', 'true');
  return params.toString();
}
