import { describe, expect, it } from 'vitest';
import { isNoteRequired, noteRequirement, reInspectionPlan } from '@/lib/deviations/disposition-plan';

/*
 * The re-inspection plan a held batch's disposition records, against ISO 2859-1:1999 Table 1 (sample
 * size code letters) and Table 2-A (single sampling, normal inspection); the same letters and plans as
 * the public-domain MIL-STD-105E Tables I and II-A. The note rules name their source beside each check.
 */

function summary(lotSize: number, level: 'II' | 'III' | 'S-4', aql: '0.65' | '1.0' | '6.5') {
  const out = reInspectionPlan({ lotSize, level, aql, severity: 'normal' });
  if (!out.ok) throw new Error(out.message);
  return out;
}

describe('re-inspection sampling plan summary', () => {
  it('gives code letter L, n 200, Ac 3 Re 4 for a lot of 5,000 at level II, AQL 0.65', () => {
    // ISO 2859-1:1999 Table 1: 3,201–10,000 at general level II → L; Table 2-A: L is n 200, AQL 0.65 → Ac 3, Re 4.
    expect(summary(5_000, 'II', '0.65').summary).toBe('ISO 2859-1 normal, level II, code letter L, n=200, AQL 0.65: Ac 3 Re 4');
  });

  it('gives code letter N, n 500, Ac 7 Re 8 for a capsule batch of 120,000 at level II, AQL 0.65', () => {
    // ISO 2859-1:1999 Table 1: 35,001–150,000 at level II → N; Table 2-A: N is n 500, AQL 0.65 → Ac 7, Re 8.
    const out = summary(120_000, 'II', '0.65');
    expect(out.plan).toMatchObject({ letter: 'N', sampleSize: 500, acceptance: 7, rejection: 8 });
    expect(out.summary).toBe('ISO 2859-1 normal, level II, code letter N, n=500, AQL 0.65: Ac 7 Re 8');
  });

  it('follows the arrow to the whole plan below and says so', () => {
    // ISO 2859-1:1999 Table 1: 151–280 at level II → G (n 32); Table 2-A at AQL 1.0 shows ↓ at G,
    // the first plan below is H: n 50, Ac 1, Re 2 (clause 10.2: use the plan the arrow points to).
    const out = summary(200, 'II', '1.0');
    expect(out.plan).toMatchObject({ lookedUpLetter: 'G', letter: 'H', sampleSize: 50, acceptance: 1, rejection: 2 });
    expect(out.summary).toBe('ISO 2859-1 normal, level II, code letter H (arrow from G), n=50, AQL 1.0: Ac 1 Re 2');
  });

  it('inspects the whole lot when the sample is as large as the lot', () => {
    // ISO 2859-1:1999 Table 1: 2–8 at level II → A (n 2); Table 2-A: A at AQL 6.5 → Ac 0, Re 1.
    // Clause 10.1: when the sample size equals or exceeds the lot size, carry out 100 % inspection.
    expect(summary(2, 'II', '6.5').summary).toBe('ISO 2859-1 normal, level II, code letter A, n=2 (whole lot), AQL 6.5: Ac 0 Re 1');
  });

  it('fits the 120-character column even with an arrow and a whole-lot note', () => {
    const out = summary(3, 'III', '0.65');
    expect(out.summary.length).toBeLessThanOrEqual(120);
  });

  it('refuses a lot below the smallest row of Table 1 (ISO 2859-1:1999 Table 1 starts at 2)', () => {
    const out = reInspectionPlan({ lotSize: 1, level: 'II', aql: '0.65', severity: 'normal' });
    expect(out).toMatchObject({ ok: false });
  });

  it('reports a plan the table cannot give instead of inventing one', () => {
    // A published copy of MIL-STD-105E Table II-A (same plans as ISO 2859-1:1999 Table 2-A) prints ↑ at
    // code letter A, AQL 10, with no plan above it: a lot of 2 at level II has no plan there.
    expect(reInspectionPlan({ lotSize: 2, level: 'II', aql: '10', severity: 'normal' })).toMatchObject({ ok: false });
  });
});

describe('when a disposition needs a note', () => {
  it('asks why a batch is rejected or reworked (21 CFR 211.192: the written record includes the conclusions)', () => {
    expect(isNoteRequired('reject')).toBe(true);
    expect(isNoteRequired('rework')).toBe(true);
    expect(isNoteRequired('release')).toBe(false);
    expect(isNoteRequired('re_inspect')).toBe(false);
    expect(noteRequirement('reject', null)).toMatch(/rejected/);
    expect(noteRequirement('rework', null)).toMatch(/reworked/);
    expect(noteRequirement('release', null)).toBeNull();
  });

  it('asks the approver why when the final disposition differs from the recommendation (common practice)', () => {
    expect(noteRequirement('release', { recommended: 're_inspect' })).toMatch(/differs from the recommended/);
    expect(noteRequirement('release', { recommended: null })).toMatch(/No disposition was recommended/);
    expect(noteRequirement('release', { recommended: 'release' })).toBeNull();
  });
});
