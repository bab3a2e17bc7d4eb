import { describe, expect, it } from 'vitest';
import { type SignatureManifest, signatureContentHash, signatureManifestHash } from '@/lib/signatures/hash';
import {
  isSignatureMeaning,
  signatureMeaningLabels,
  signatureMeaningStatements,
  signatureMeanings,
} from '@/lib/signatures/meanings';

/*
 * 21 CFR 11.70: electronic signatures are linked to their records so they cannot be excised, copied
 * or otherwise transferred to falsify a record. The link is a SHA-256 hash over the signed content
 * and its address; it must not depend on how the content happens to be ordered, and must change
 * with any change of content or address. 21 CFR 11.50(a): the manifestation shows printed name,
 * date and time, and meaning.
 */

const content = {
  serial: 'BWR-0104',
  machineId: 1,
  capsuleSize: '0',
  condition: 'good',
  status: 'in_service',
  statusReason: null,
  retiredAt: null,
};

describe('signature content hash', () => {
  it('does not depend on key order', () => {
    const reordered = Object.fromEntries(Object.entries(content).reverse());
    expect(signatureContentHash('filling_ring', 4, 2, reordered)).toBe(signatureContentHash('filling_ring', 4, 2, content));
  });

  it('is 64 hex characters (SHA-256)', () => {
    expect(signatureContentHash('filling_ring', 4, 2, content)).toMatch(/^[0-9a-f]{64}$/);
  });

  it.each(Object.keys(content))('changes when %s changes', (field) => {
    const changed = { ...content, [field]: field === 'machineId' ? 2 : 'something else' };
    expect(signatureContentHash('filling_ring', 4, 2, changed)).not.toBe(signatureContentHash('filling_ring', 4, 2, content));
  });

  it('cannot be moved to another record, record type or version', () => {
    const h = signatureContentHash('filling_ring', 4, 2, content);
    expect(signatureContentHash('filling_ring', 5, 2, content)).not.toBe(h);
    expect(signatureContentHash('deviation', 4, 2, content)).not.toBe(h);
    expect(signatureContentHash('filling_ring', 4, 3, content)).not.toBe(h);
  });

  it('sees a date as the instant it is', () => {
    const at = Date.UTC(2026, 11, 2, 8, 0, 0, 123);
    expect(signatureContentHash('filling_ring', 4, 2, { ...content, retiredAt: new Date(at) })).toBe(
      signatureContentHash('filling_ring', 4, 2, { ...content, retiredAt: new Date(at) }),
    );
    expect(signatureContentHash('filling_ring', 4, 2, { ...content, retiredAt: new Date(at) })).not.toBe(
      signatureContentHash('filling_ring', 4, 2, { ...content, retiredAt: new Date(at + 1) }),
    );
  });
});

describe('signature manifest hash', () => {
  const manifest: SignatureManifest = {
    recordType: 'filling_ring',
    recordId: 4,
    recordVersion: 3,
    userId: 6,
    printedName: 'Henrike Mbeki-Strand',
    printedTitle: 'QA Manager',
    meaning: 'approved',
    signedAt: '2026-12-02 08:00:00.000',
    contentHash: signatureContentHash('filling_ring', 4, 3, content),
  };

  it.each(['printedName', 'printedTitle', 'meaning', 'signedAt', 'contentHash', 'userId'] as const)(
    'changes when the %s shown on the signature changes',
    (field) => {
      const edited = { ...manifest, [field]: field === 'userId' ? 7 : 'x' };
      expect(signatureManifestHash(edited)).not.toBe(signatureManifestHash(manifest));
    },
  );
});

describe('signature meanings', () => {
  it('are the closed list the product uses, each with a label and a statement', () => {
    expect([...signatureMeanings]).toEqual([
      'authored',
      'reviewed',
      'approved',
      'rejected',
      'verified',
      'responsible',
      'investigation_complete',
      'effective',
      'not_effective',
      'reportability_decided',
    ]);
    for (const m of signatureMeanings) {
      expect(signatureMeaningLabels[m]).toBeTruthy();
      expect(signatureMeaningStatements[m]).toMatch(/^I /);
    }
    expect(isSignatureMeaning('approved')).toBe(true);
    expect(isSignatureMeaning('ok')).toBe(false);
  });
});
