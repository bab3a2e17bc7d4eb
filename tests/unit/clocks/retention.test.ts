import { describe, expect, it } from 'vitest';
import {
  batchRecordRetention,
  complaintRecordRetention,
  dietarySupplementRecordRetention,
  drugBatchRecordRetention,
} from '../../../lib/clocks/retention';

describe('record retention', () => {
  it('batch records: at least 1 year after the batch expiry date (21 CFR 211.180(a))', () => {
    const r = drugBatchRecordRetention({ kind: 'expiry', expiresOn: '2028-06-30' });
    expect(r).toMatchObject({ retainUntil: '2029-06-30', citation: '21 CFR 211.180(a)' });
    expect(r.rule).toMatch(/1 year after the expiration date/);
  });

  it('batch records of certain OTC products without expiry: 3 years after distribution (21 CFR 211.180(a))', () => {
    const r = drugBatchRecordRetention({ kind: 'otc_without_expiry', distributedOn: '2026-08-15' });
    expect(r.retainUntil).toBe('2029-08-15');
    expect(r.rule).toMatch(/211\.137/);
  });

  it('complaint records: 1 year after expiry or after receipt, whichever is longer (21 CFR 211.198(b))', () => {
    expect(complaintRecordRetention({ kind: 'expiry', expiresOn: '2027-03-31', receivedOn: '2026-10-01' }).retainUntil).toBe(
      '2028-03-31',
    );
    // Complaint received after the product expired: receipt decides.
    expect(complaintRecordRetention({ kind: 'expiry', expiresOn: '2026-12-31', receivedOn: '2027-06-01' }).retainUntil).toBe(
      '2028-06-01',
    );
    const otc = complaintRecordRetention({ kind: 'otc_without_expiry', distributedOn: '2026-09-01' });
    expect(otc).toMatchObject({ retainUntil: '2029-09-01', citation: '21 CFR 211.198(b)' });
  });

  it('one year after a 29 February expiry is 1 March, never the day before', () => {
    expect(drugBatchRecordRetention({ kind: 'expiry', expiresOn: '2028-02-29' }).retainUntil).toBe('2029-03-01');
  });

  it('dietary supplements: 1 year past shelf life, or 2 years after the last batch was distributed (21 CFR 111.605)', () => {
    expect(dietarySupplementRecordRetention({ kind: 'shelf_life', shelfLifeDate: '2028-09-30' })).toMatchObject({
      retainUntil: '2029-09-30',
      citation: '21 CFR 111.605(a)',
    });
    expect(dietarySupplementRecordRetention({ kind: 'distribution', lastBatchDistributedOn: '2026-11-02' }).retainUntil).toBe(
      '2028-11-02',
    );
  });
});

describe('batch record retention by product class', () => {
  it('keeps a drug batch’s records 1 year past its expiration date (21 CFR 211.180(a))', () => {
    const r = batchRecordRetention({ regulatoryClass: 'drug', expiresOn: '2028-10-31' });
    expect(r).toMatchObject({ retainUntil: '2029-10-31', citation: '21 CFR 211.180(a)' });
  });

  it('keeps a supplement batch’s records 1 year past its shelf life date (21 CFR 111.605(a))', () => {
    const r = batchRecordRetention({ regulatoryClass: 'supplement', expiresOn: '2028-02-29' });
    expect(r).toMatchObject({ retainUntil: '2029-03-01', citation: '21 CFR 111.605(a)' });
  });

  it('gives no date when the batch carries no expiration date (the rule then runs from distribution)', () => {
    expect(batchRecordRetention({ regulatoryClass: 'drug', expiresOn: null })).toBeNull();
  });
});
