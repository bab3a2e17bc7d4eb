import { describe, expect, it } from 'vitest';
import { ValidationError } from '@/lib/errors';
import { parseDeviationListQuery, parseDeviationListQueryStrict } from '@/lib/validation/deviation-list';

/* The list's URL state. Defaults and fallbacks are common practice for bookmarkable lists (no published source). */

describe('deviation list query (common practice)', () => {
  it('an empty URL is the first 50, newest raised first, unfiltered', () => {
    expect(parseDeviationListQuery({})).toMatchObject({
      page: 1, pageSize: 50, sort: 'raised', dir: 'desc', status: [], classification: [],
      productId: null, lot: null, raisedFrom: null, overdue: false,
    });
  });

  it('reads every filter from URL strings; repeated keys and comma lists both give lists', () => {
    const q = parseDeviationListQuery(
      new URLSearchParams('page=3&pageSize=20&sort=rpn&dir=asc&status=triage,closed&status=approval&classification=major' +
        '&productId=4&batchId=5&lot=%20BW-26-001%20&machineId=6&ringId=7&defectId=8&ownerId=9&raisedFrom=2026-07-01&raisedTo=2026-07-31&overdue=yes'),
    );
    expect(q).toEqual({
      page: 3, pageSize: 20, sort: 'rpn', dir: 'asc', status: ['triage', 'closed', 'approval'], classification: ['major'],
      productId: 4, batchId: 5, lot: 'BW-26-001', machineId: 6, ringId: 7, defectId: 8, ownerId: 9,
      raisedFrom: '2026-07-01', raisedTo: '2026-07-31', overdue: true,
    });
  });

  it('unreadable values fall back to their defaults one by one instead of failing the page', () => {
    const q = parseDeviationListQuery(
      new URLSearchParams('page=0&pageSize=500&sort=colour&dir=up&status=lost&productId=abc&raisedFrom=2026-02-30&overdue=maybe&ringId=7'),
    );
    expect(q).toMatchObject({ page: 1, pageSize: 50, sort: 'raised', dir: 'desc', status: [], productId: null, raisedFrom: null, overdue: false, ringId: 7 });
    expect(parseDeviationListQuery({ pageSize: '9' }).pageSize).toBe(50);
    expect(parseDeviationListQuery({ pageSize: '10' }).pageSize).toBe(10);
    expect(parseDeviationListQuery({ pageSize: '100' }).pageSize).toBe(100);
  });

  it('blank parameters (an empty form field) mean "not given", also in strict mode', () => {
    expect(parseDeviationListQueryStrict({ status: '', productId: '', overdue: '', page: '' })).toMatchObject({
      status: [], productId: null, overdue: false, page: 1,
    });
  });

  it('strict mode (the API) names each bad field instead of guessing', () => {
    let caught: unknown;
    try {
      parseDeviationListQueryStrict(new URLSearchParams('page=0&sort=colour&status=triage,lost&overdue=maybe&raisedTo=2026-13-01&pageSize=101'));
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(ValidationError);
    expect(Object.keys((caught as ValidationError).fieldErrors).sort()).toEqual(['overdue', 'page', 'pageSize', 'raisedTo', 'sort', 'status']);
  });

  it('overdue reads the usual spellings of true and false', () => {
    for (const v of ['true', '1', 'on', 'YES']) expect(parseDeviationListQueryStrict({ overdue: v }).overdue).toBe(true);
    for (const v of ['false', '0', 'off', 'no']) expect(parseDeviationListQueryStrict({ overdue: v }).overdue).toBe(false);
  });
});
