import { describe, expect, it } from 'vitest';
import {
  type AuditContent,
  type ChainRow,
  auditEntryHash,
  canonicalJson,
  diffFields,
  findChainBreak,
  genesisHash,
  sha256Hex,
  sqlUtc,
} from '@/lib/audit/hash';

/*
 * The audit trail's hash chain. 21 CFR 11.10(e) asks for a secure, computer-generated, time-stamped
 * audit trail that does not obscure earlier entries; 11.10(a) for the ability to discern altered
 * records. Chaining each entry to the hash of the one before makes changing, removing or
 * reordering an entry detectable (the chaining itself is common practice, e.g. in append-only logs).
 */

describe('SHA-256', () => {
  it('matches the FIPS 180-4 example digest of "abc"', () => {
    // FIPS 180-4 / NIST CSRC example values, SHA-256 one-block message.
    expect(sha256Hex('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });
});

describe('canonical JSON', () => {
  it('sorts keys at every depth, so equal content always gives the same text', () => {
    const a = { b: 1, a: { d: [3, { z: 1, y: 2 }], c: 'x' } };
    const b = { a: { c: 'x', d: [3, { y: 2, z: 1 }] }, b: 1 };
    expect(canonicalJson(a)).toBe(canonicalJson(b));
    expect(canonicalJson(a)).toBe('{"a":{"c":"x","d":[3,{"y":2,"z":1}]},"b":1}');
  });

  it('keeps array order, writes dates as UTC ISO text and undefined as null', () => {
    expect(canonicalJson([2, 1])).not.toBe(canonicalJson([1, 2]));
    expect(canonicalJson({ at: new Date(Date.UTC(2026, 11, 2, 8, 0, 0, 5)) })).toBe('{"at":"2026-12-02T08:00:00.005Z"}');
    expect(canonicalJson({ x: undefined })).toBe('{"x":null}');
  });
});

describe('audit chain', () => {
  const content = (i: number): AuditContent => ({
    at: `2026-12-02 08:00:0${i}.000`,
    userId: 3,
    userName: 'Idris Vantongeren',
    recordType: 'filling_ring',
    recordId: 11,
    action: i === 1 ? 'quarantine' : 'edit',
    changes: canonicalJson([{ field: 'condition', from: 'good', to: i % 2 ? 'dented' : 'worn' }]),
    reason: `step ${i}`,
  });

  function chain(n: number): ChainRow[] {
    const rows: ChainRow[] = [];
    let prev = genesisHash;
    for (let i = 1; i <= n; i++) {
      const c = content(i);
      const hash = auditEntryHash(prev, c);
      rows.push({ id: i, ...c, prevHash: prev, hash });
      prev = hash;
    }
    return rows;
  }

  it('accepts an untouched chain and reports where it ends', () => {
    const rows = chain(5);
    expect(findChainBreak(rows, genesisHash)).toEqual({ lastHash: rows[4]!.hash });
  });

  it('links each entry to the one before: the same content after a different entry hashes differently', () => {
    expect(auditEntryHash(genesisHash, content(1))).not.toBe(auditEntryHash('f'.repeat(64), content(1)));
  });

  it.each([
    ['reason', { reason: 'a different reason' }],
    ['user', { userName: 'Someone Else' }],
    ['time', { at: '2026-12-02 07:59:59.000' }],
    ['field changes', { changes: canonicalJson([{ field: 'condition', from: 'good', to: 'good' }]) }],
  ])('detects a changed %s in the entry that was changed', (_what, edit) => {
    const rows = chain(5);
    rows[2] = { ...rows[2]!, ...edit };
    expect(findChainBreak(rows, genesisHash)).toMatchObject({ id: 3, problem: expect.stringMatching(/content does not match/) });
  });

  it('detects a removed entry at the entry after the gap', () => {
    const rows = chain(5);
    rows.splice(2, 1);
    expect(findChainBreak(rows, genesisHash)).toMatchObject({ id: 4, problem: expect.stringMatching(/does not follow/) });
  });

  it('detects two entries swapped', () => {
    const rows = chain(5);
    [rows[1], rows[2]] = [rows[2]!, rows[1]!];
    expect(findChainBreak(rows, genesisHash)).toMatchObject({ id: 3 });
  });

  it('detects an entry rewritten with a freshly computed hash, at the entry after it', () => {
    const rows = chain(5);
    const forged = { ...content(3), reason: 'rewritten' };
    rows[2] = { id: 3, ...forged, prevHash: rows[2]!.prevHash, hash: auditEntryHash(rows[2]!.prevHash, forged) };
    expect(findChainBreak(rows, genesisHash)).toMatchObject({ id: 4, problem: expect.stringMatching(/does not follow/) });
  });

  it('detects a changed link (prev hash) in the entry that carries it', () => {
    const rows = chain(3);
    rows[1] = { ...rows[1]!, prevHash: 'a'.repeat(64) };
    expect(findChainBreak(rows, genesisHash)).toMatchObject({ id: 2 });
  });

  it('ends on a different hash when the tail is rewritten wholesale, which the stored chain head catches', () => {
    const rows = chain(4);
    const original = findChainBreak(rows, genesisHash);
    let prev = rows[1]!.hash;
    for (let i = 2; i < 4; i++) {
      const c = { ...rows[i]!, reason: 'rewritten' };
      const { id: _id, prevHash: _p, hash: _h, ...body } = c;
      rows[i] = { ...c, prevHash: prev, hash: auditEntryHash(prev, body) };
      prev = rows[i]!.hash;
    }
    const rewritten = findChainBreak(rows, genesisHash);
    expect('lastHash' in rewritten && 'lastHash' in original && rewritten.lastHash !== original.lastHash).toBe(true);
  });
});

describe('field changes', () => {
  it('lists only the fields that changed, from old to new', () => {
    const before = { status: 'in_service', condition: 'good', serial: 'BWR-0101' };
    const after = { status: 'quarantined', condition: 'good', serial: 'BWR-0101' };
    expect(diffFields(before, after)).toEqual([{ field: 'status', from: 'in_service', to: 'quarantined' }]);
  });

  it('treats a new record as changing every listed field from null', () => {
    expect(diffFields(null, { a: 1, b: null }, ['a', 'b'])).toEqual([{ field: 'a', from: null, to: 1 }]);
  });

  it('compares dates by instant', () => {
    const t = Date.UTC(2026, 0, 1);
    expect(diffFields({ at: new Date(t) }, { at: new Date(t) })).toEqual([]);
    expect(diffFields({ at: new Date(t) }, { at: new Date(t + 1) })).toHaveLength(1);
  });

  it('writes UTC times with milliseconds the way DATETIME(3) stores them', () => {
    expect(sqlUtc(new Date(Date.UTC(2026, 11, 2, 8, 5, 9, 42)))).toBe('2026-12-02 08:05:09.042');
  });
});
