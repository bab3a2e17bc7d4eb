import { addYears, type IsoDate } from './dates';

/*
 * How long quality records must be kept, from the US GMP regulations. Each function returns the
 * earliest day the record may be discarded (retain until at least this day) with the rule it
 * comes from, so the screen that holds the record can say why. "1 year after" a 29 February is
 * taken as 1 March (see addYears): the later reading, so nothing is discarded early.
 */

export interface Retention {
  retainUntil: IsoDate;
  citation: string;
  rule: string;
}

/** Drug product production, control and distribution records of a batch: 21 CFR 211.180(a). */
export type DrugBatchRecordBasis =
  | { kind: 'expiry'; expiresOn: IsoDate }
  /** Certain OTC drug products without expiration dating because they meet the § 211.137 exemption. */
  | { kind: 'otc_without_expiry'; distributedOn: IsoDate };

export function drugBatchRecordRetention(basis: DrugBatchRecordBasis): Retention {
  const citation = '21 CFR 211.180(a)';
  if (basis.kind === 'expiry') {
    return {
      retainUntil: addYears(basis.expiresOn, 1),
      citation,
      rule: 'Production, control and distribution records of a batch are kept for at least 1 year after the expiration date of the batch.',
    };
  }
  return {
    retainUntil: addYears(basis.distributedOn, 3),
    citation,
    rule:
      'For certain OTC drug products lacking expiration dating (exempt under § 211.137), batch records are kept for 3 years after distribution of the batch.',
  };
}

/** Written records of a drug product complaint: 21 CFR 211.198(b). */
export type ComplaintRecordBasis =
  | { kind: 'expiry'; expiresOn: IsoDate; receivedOn: IsoDate }
  | { kind: 'otc_without_expiry'; distributedOn: IsoDate };

export function complaintRecordRetention(basis: ComplaintRecordBasis): Retention {
  const citation = '21 CFR 211.198(b)';
  if (basis.kind === 'expiry') {
    const afterExpiry = addYears(basis.expiresOn, 1);
    const afterReceipt = addYears(basis.receivedOn, 1);
    return {
      retainUntil: afterExpiry > afterReceipt ? afterExpiry : afterReceipt,
      citation,
      rule:
        'Complaint records are kept until at least 1 year after the expiration date of the drug product, or 1 year after the complaint was received, whichever is longer.',
    };
  }
  return {
    retainUntil: addYears(basis.distributedOn, 3),
    citation,
    rule:
      'For certain OTC drug products lacking expiration dating (exempt under § 211.137), complaint records are kept for 3 years after distribution of the drug product.',
  };
}

/** Dietary supplement records required by 21 CFR part 111: 21 CFR 111.605(a). */
export type DietarySupplementRecordBasis =
  | { kind: 'shelf_life'; shelfLifeDate: IsoDate }
  | { kind: 'distribution'; lastBatchDistributedOn: IsoDate };

export function dietarySupplementRecordRetention(basis: DietarySupplementRecordBasis): Retention {
  const citation = '21 CFR 111.605(a)';
  if (basis.kind === 'shelf_life') {
    return {
      retainUntil: addYears(basis.shelfLifeDate, 1),
      citation,
      rule: 'Records are kept for 1 year past the shelf life date, when shelf life dating is used.',
    };
  }
  return {
    retainUntil: addYears(basis.lastBatchDistributedOn, 2),
    citation,
    rule:
      'Without shelf life dating, records are kept for 2 years beyond the date of distribution of the last batch of dietary supplements associated with them.',
  };
}

/**
 * A batch's records, by what the product is: a drug (21 CFR 211.180(a)) or a dietary supplement
 * (21 CFR 111.605(a)), both counted from the batch's expiration (shelf life) date. Null when the batch
 * carries no such date, since the rule then runs from distribution, which the batch list does not know.
 */
export function batchRecordRetention(batch: {
  regulatoryClass: 'drug' | 'supplement';
  expiresOn: IsoDate | null;
}): Retention | null {
  if (!batch.expiresOn) return null;
  return batch.regulatoryClass === 'drug'
    ? drugBatchRecordRetention({ kind: 'expiry', expiresOn: batch.expiresOn })
    : dietarySupplementRecordRetention({ kind: 'shelf_life', shelfLifeDate: batch.expiresOn });
}
