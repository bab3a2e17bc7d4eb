import { z } from 'zod';
import { complaintStates } from '../../workflows/states';
import { parseInput } from '../validation/parse';

/*
 * The complaint list's state as it sits in the URL: paging, sorting and filters. The page reads its
 * URL leniently (an unreadable value falls back to its default); the JSON API reads it strictly and
 * says which parameter is wrong. Pure: the client writes the same shape back into the URL.
 */

export const complaintListSorts = ['number', 'received', 'status', 'due', 'report_due'] as const;
export type ComplaintListSort = (typeof complaintListSorts)[number];
export const complaintListDefaults = { page: 1, pageSize: 50, sort: 'received', dir: 'desc' } as const;

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

const flag = (message: string) =>
  z.preprocess((v) => {
    const x = scalar(v);
    if (typeof x !== 'string') return x;
    return ['true', '1', 'yes', 'on'].includes(x.toLowerCase()) ? true : ['false', '0', 'no', 'off'].includes(x.toLowerCase()) ? false : x;
  }, z.boolean({ error: message }).default(false));

const shape = {
  page: whole('Page must be a whole number from 1.', 1, 100_000, complaintListDefaults.page),
  pageSize: whole('Page size must be a whole number from 10 to 100.', 10, 100, complaintListDefaults.pageSize),
  sort: z.preprocess(scalar, z.enum(complaintListSorts, { error: `Sort by one of: ${complaintListSorts.join(', ')}.` }).default(complaintListDefaults.sort)),
  dir: z.preprocess(scalar, z.enum(['asc', 'desc'], { error: 'Direction is asc or desc.' }).default(complaintListDefaults.dir)),
  status: z.preprocess(list, z.array(z.enum(complaintStates, { error: `Status is one or more of: ${complaintStates.join(', ')}.` })).default([])),
  productId: z.preprocess(
    scalar,
    z.coerce.number({ error: 'Product must be a product id.' }).int({ error: 'Product must be a product id.' }).positive({ error: 'Product must be a product id.' }).max(2_147_483_647).nullable().default(null),
  ),
  category: z.preprocess(scalar, z.string().trim().max(48, { error: 'Category is a catalogue code.' }).regex(/^[a-z_]+$/, { error: 'Category is a catalogue code.' }).nullable().default(null)),
  lot: z.preprocess(scalar, z.string().trim().max(60, { error: 'Lot is at most 60 characters.' }).nullable().default(null)),
  reportable: flag('Reportable is true or false.'),
  lotUnknown: flag('Unknown lot is true or false.'),
};

type Shape = typeof shape;
const strictSchema = z.object(shape);
const lenientSchema = z.object(
  Object.fromEntries(Object.entries(shape).map(([k, s]) => [k, (s as z.ZodType).catch(() => s.parse(undefined))])) as {
    [K in keyof Shape]: z.ZodCatch<Shape[K]>;
  },
);

export type ComplaintListQuery = z.output<typeof strictSchema>;
type Raw = string | string[] | undefined | null;
export type SearchParamsLike = URLSearchParams | Record<string, Raw>;

function toRecord(params: SearchParamsLike): Record<string, Raw> {
  if (!(params instanceof URLSearchParams)) return params;
  const out: Record<string, string[]> = {};
  for (const [key, value] of params.entries()) (out[key] ??= []).push(value);
  return out;
}

/** A page's query from its URL; never throws. */
export function parseComplaintListQuery(params: SearchParamsLike): ComplaintListQuery {
  return lenientSchema.parse(toRecord(params));
}

/** The API's query; throws ValidationError (422) naming each bad parameter. */
export function parseComplaintListQueryStrict(params: SearchParamsLike): ComplaintListQuery {
  return parseInput(strictSchema, toRecord(params));
}

/** The query written back into a URL, defaults left out so the plain address is the default view. */
export function complaintListSearch(query: ComplaintListQuery): string {
  const params = new URLSearchParams();
  if (query.page !== complaintListDefaults.page) params.set('page', String(query.page));
  if (query.pageSize !== complaintListDefaults.pageSize) params.set('pageSize', String(query.pageSize));
  if (query.sort !== complaintListDefaults.sort || query.dir !== complaintListDefaults.dir) {
    params.set('sort', query.sort);
    params.set('dir', query.dir);
  }
  for (const s of query.status) params.append('status', s);
  if (query.productId !== null) params.set('productId', String(query.productId));
  if (query.category !== null) params.set('category', query.category);
  if (query.lot !== null) params.set('lot', query.lot);
  if (query.reportable) params.set('reportable', 'true');
  if (query.lotUnknown) params.set('lotUnknown', 'true');
  return params.toString();
}
