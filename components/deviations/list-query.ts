import type { DeviationListQuery } from '@/lib/validation/deviation-list';

/*
 * The list's state written back into a URL query. Defaults are left out so the plain address is the
 * default view and a bookmarked view carries only what the person chose. Pure; the reading side is
 * the shared lenient parser on the server.
 */

export type ListDefaults = Pick<DeviationListQuery, 'page' | 'pageSize' | 'sort' | 'dir'>;

export function deviationListSearch(query: DeviationListQuery, defaults: ListDefaults): string {
  const params = new URLSearchParams();
  if (query.page !== defaults.page) params.set('page', String(query.page));
  if (query.pageSize !== defaults.pageSize) params.set('pageSize', String(query.pageSize));
  if (query.sort !== defaults.sort || query.dir !== defaults.dir) {
    params.set('sort', query.sort);
    params.set('dir', query.dir);
  }
  for (const s of query.status) params.append('status', s);
  for (const c of query.classification) params.append('classification', c);
  const ids = ['productId', 'batchId', 'machineId', 'ringId', 'defectId', 'ownerId'] as const;
  for (const key of ids) {
    const value = query[key];
    if (value !== null) params.set(key, String(value));
  }
  if (query.lot !== null) params.set('lot', query.lot);
  if (query.raisedFrom !== null) params.set('raisedFrom', query.raisedFrom);
  if (query.raisedTo !== null) params.set('raisedTo', query.raisedTo);
  if (query.overdue) params.set('overdue', 'true');
  return params.toString();
}

/** How many filters narrow the list, for the collapsed filter panel's label. */
export function activeFilterCount(query: DeviationListQuery): number {
  return (
    (query.status.length > 0 ? 1 : 0) +
    (query.classification.length > 0 ? 1 : 0) +
    [query.productId, query.batchId, query.machineId, query.ringId, query.defectId, query.ownerId, query.lot].filter(
      (v) => v !== null,
    ).length +
    (query.raisedFrom !== null || query.raisedTo !== null ? 1 : 0) +
    (query.overdue ? 1 : 0)
  );
}
