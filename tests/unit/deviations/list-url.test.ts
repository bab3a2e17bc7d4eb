import { describe, expect, it } from 'vitest';
import { activeFilterCount, deviationListSearch } from '@/components/deviations/list-query';
import { deviationListDefaults, parseDeviationListQuery } from '@/lib/validation/deviation-list';

/*
 * A filtered deviation list can be bookmarked and shared: the URL the table writes must read back
 * into the same view (common practice for list screens; the issue asks for state kept in the URL).
 */

const roundTrip = (search: string) => {
  const query = parseDeviationListQuery(new URLSearchParams(search));
  return deviationListSearch(query, deviationListDefaults);
};

describe('deviation list state in the URL', () => {
  it('writes nothing for the default view', () => {
    expect(roundTrip('')).toBe('');
  });

  it('reads back every filter and the sort it wrote', () => {
    const search =
      'sort=rpn&dir=desc&status=triage&status=investigation&classification=major&productId=3&machineId=2&ringId=7&defectId=4&ownerId=5&lot=BW-2026-1027-B&raisedFrom=2026-10-01&raisedTo=2026-11-30&overdue=true&page=2';
    const written = roundTrip(search);
    const again = parseDeviationListQuery(new URLSearchParams(written));
    expect(again).toEqual(parseDeviationListQuery(new URLSearchParams(search)));
    expect(again).toMatchObject({ sort: 'rpn', dir: 'desc', status: ['triage', 'investigation'], overdue: true, page: 2 });
  });

  it('counts the filters that narrow the list, not the sort or the page', () => {
    expect(activeFilterCount(parseDeviationListQuery(new URLSearchParams('sort=rpn&page=3')))).toBe(0);
    expect(activeFilterCount(parseDeviationListQuery(new URLSearchParams('status=closed&lot=BW-1&overdue=true')))).toBe(3);
  });
});
