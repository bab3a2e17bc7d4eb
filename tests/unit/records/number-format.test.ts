import { describe, expect, it } from 'vitest';
import { formatRecordNumber, parseRecordNumber } from '@/lib/records/number-format';
import { numberPrefixes } from '@/lib/records/types';

/*
 * Human record numbers: prefix, year, sequence padded to four digits. The format is the product's
 * own choice (common practice for quality records; no regulation prescribes one). A year with more
 * than 9999 records keeps counting rather than wrapping.
 */

describe('record number text', () => {
  it.each([
    ['DEV', 2026, 1, 'DEV-2026-0001'],
    ['CAPA', 2026, 42, 'CAPA-2026-0042'],
    ['CMP', 2027, 9999, 'CMP-2027-9999'],
    ['DEV', 2027, 10000, 'DEV-2027-10000'],
  ])('%s %i #%i reads %s', (prefix, year, value, text) => {
    expect(formatRecordNumber(prefix, year, value)).toBe(text);
    expect(parseRecordNumber(text)).toEqual({ prefix, year, value });
  });

  it('does not read malformed numbers', () => {
    expect(parseRecordNumber('DEV-26-0001')).toBeNull();
    expect(parseRecordNumber('DEV-2026-1')).toBeNull();
    expect(parseRecordNumber('dev-2026-0001')).toBeNull();
  });

  it('uses one prefix per numbered record type', () => {
    expect(numberPrefixes).toEqual({ deviation: 'DEV', capa: 'CAPA', complaint: 'CMP' });
  });
});
