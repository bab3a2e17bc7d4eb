import { describe, expect, it } from 'vitest';
import { type Aql, aqlValues, type CodeLetter, codeLetters, type InspectionLevel } from '@/lib/sampling/master-tables';
import {
  codeLetterFor,
  findSamplingPlan,
  judgeSample,
  type PlanQuery,
  type Severity,
  severities,
  tableCell,
} from '@/lib/sampling/plan';

/*
 * Sources named per check. "MIL-STD-105E II-A/II-B published copy" means the cell was compared with
 * a published copy of the public-domain MIL-STD-105E (10 May 1989) tables, which carry the
 * same plans as ISO 2859-1:1999 Tables 2-A/2-B and ANSI/ASQ Z1.4-2003 Tables II-A/II-B. Those
 * published copies cover rows A–Q (II-A) and A–L (II-B) at AQL 0.65 … 15 and give Re; Ac is Re − 1,
 * as in every single plan of II-A and II-B. "From memory" marks values that were not compared
 * with any printed table; "derived" marks the reduced table, built by rule (see master-tables.ts).
 */

function plan(query: PlanQuery) {
  const result = findSamplingPlan(query);
  if (!result.ok) throw new Error(result.reason);
  return result.plan;
}

describe('sample size code letters (MIL-STD-105E Table I; same letters as ISO 2859-1:1999 Table 1 and Z1.4-2003 Table I)', () => {
  // Each pair is the last lot size of a row and the first of the next, general level II.
  const boundaries: [number, string, string][] = [
    [8, 'A', 'B'],
    [15, 'B', 'C'],
    [25, 'C', 'D'],
    [50, 'D', 'E'],
    [90, 'E', 'F'],
    [150, 'F', 'G'],
    [280, 'G', 'H'],
    [500, 'H', 'J'],
    [1200, 'J', 'K'],
    [3200, 'K', 'L'],
    [10000, 'L', 'M'],
    [35000, 'M', 'N'],
    [150000, 'N', 'P'],
    [500000, 'P', 'Q'],
  ];
  it.each(boundaries)('level II: lot %i is %s, one more is %s', (last, before, after) => {
    expect(codeLetterFor(last, 'II')).toBe(before);
    expect(codeLetterFor(last + 1, 'II')).toBe(after);
  });

  it('starts at a lot of 2 and runs to "500 001 and over"', () => {
    expect(codeLetterFor(2, 'II')).toBe('A');
    expect(codeLetterFor(500001, 'II')).toBe('Q');
    expect(codeLetterFor(50_000_000, 'III')).toBe('R');
  });

  const rows: [number, string][] = [
    // lot size, letters for S-1 S-2 S-3 S-4 I II III
    [2, 'AAAAAAB'],
    [20, 'AABBBCD'],
    [40, 'ABBCCDE'],
    [300, 'BCDEFHJ'],
    [1000, 'CCEFGJK'],
    [2000, 'CDEGHKL'],
    [20000, 'CDFHKMN'],
    [100000, 'DEGJLNP'],
    [1000000, 'DEHKNQR'],
  ];
  const levels: InspectionLevel[] = ['S-1', 'S-2', 'S-3', 'S-4', 'I', 'II', 'III'];
  it.each(rows)('lot %i gives %s across S-1 … S-4, I, II, III', (lot, letters) => {
    expect(levels.map((level) => codeLetterFor(lot, level)).join('')).toBe(letters);
  });

  it('refuses lots the table does not cover', () => {
    expect(() => codeLetterFor(1, 'II')).toThrow(RangeError);
    expect(() => codeLetterFor(12.5, 'II')).toThrow(RangeError);
  });
});

describe('normal inspection (ISO 2859-1:1999 Table 2-A)', () => {
  it('lot 2000, level II, AQL 0.65: K, n 125, Ac 2 Re 3', () => {
    // MIL-STD-105E II-A published copy; the same worked example appears in Montgomery,
    // Introduction to Statistical Quality Control (from memory for the book's page).
    expect(plan({ lotSize: 2000, level: 'II', aql: '0.65', severity: 'normal' })).toMatchObject({
      lookedUpLetter: 'K',
      letter: 'K',
      sampleSize: 125,
      acceptance: 2,
      rejection: 3,
      arrow: null,
      hundredPercent: false,
      notes: [],
    });
  });

  it.each<[number, InspectionLevel, Aql, string, number, number, number]>([
    // MIL-STD-105E II-A published copy
    [5000, 'II', '2.5', 'L', 200, 10, 11],
    [800, 'II', '4.0', 'J', 80, 7, 8],
    [100, 'II', '6.5', 'F', 20, 3, 4],
    [50000, 'II', '1.0', 'N', 500, 10, 11],
    [3000, 'II', '10', 'K', 125, 21, 22],
    [400, 'II', '15', 'H', 50, 14, 15],
  ])('lot %i, level %s, AQL %s: %s, n %i, Ac %i Re %i', (lotSize, level, aql, letter, n, ac, re) => {
    expect(plan({ lotSize, level, aql, severity: 'normal' })).toMatchObject({
      letter,
      sampleSize: n,
      acceptance: ac,
      rejection: re,
      arrow: null,
    });
  });

  it('follows a down arrow to the next plan and takes its sample size (G at 1.0 → H, n 50, 1/2)', () => {
    // MIL-STD-105E II-A published copy: G at 1.0 is ↓, H at 1.0 is 1/2.
    const p = plan({ lotSize: 200, level: 'II', aql: '1.0', severity: 'normal' });
    expect(p).toMatchObject({ lookedUpLetter: 'G', letter: 'H', sampleSize: 50, acceptance: 1, rejection: 2, arrow: 'down' });
    expect(p.notes[0]).toMatch(/arrow down.*code letter H, sample size 50/);
    expect(p.notes[0]).toMatch(/not the 32 of code letter G/);
  });

  it('follows an up arrow (G at 0.65 → F, n 20, 0/1)', () => {
    // MIL-STD-105E II-A published copy: G at 0.65 is ↑, F at 0.65 is 0/1.
    const p = plan({ lotSize: 200, level: 'II', aql: '0.65', severity: 'normal' });
    expect(p).toMatchObject({ lookedUpLetter: 'G', letter: 'F', sampleSize: 20, acceptance: 0, rejection: 1, arrow: 'up' });
    expect(p.notes[0]).toMatch(/arrow up.*first plan above/);
  });

  it('follows an up arrow in the lower right (Q at 1.5 → P, n 800, 21/22)', () => {
    // MIL-STD-105E II-A published copy
    expect(plan({ lotSize: 600000, level: 'II', aql: '1.5', severity: 'normal' })).toMatchObject({
      lookedUpLetter: 'Q',
      letter: 'P',
      sampleSize: 800,
      acceptance: 21,
      rejection: 22,
    });
  });

  it('follows a long down arrow and inspects the whole lot when the sample is not smaller than it', () => {
    // B at 0.65 ↓ … F at 0.65 = 0/1, n 20 (MIL-STD-105E II-A published copy); n ≥ lot → 100 %
    // inspection (ISO 2859-1:1999 Table 2-A footnote; Z1.4-2003 Table II-A footnote).
    const p = plan({ lotSize: 10, level: 'II', aql: '0.65', severity: 'normal' });
    expect(p).toMatchObject({ lookedUpLetter: 'B', letter: 'F', tableSampleSize: 20, sampleSize: 10, hundredPercent: true });
    expect(p.notes).toHaveLength(2);
    expect(p.notes[1]).toMatch(/100 % inspection/);
  });

  it('100 % inspection also when the sample size equals the lot exactly', () => {
    // Z1.4-2003 Table II-A footnote: "equals, or exceeds"
    const p = plan({ lotSize: 13, level: 'S-4', aql: '1.0', severity: 'normal' });
    // lot 13 → S-4 A; A at 1.0 ↓ … E at 1.0 = 0/1, n 13 (MIL-STD-105E II-A published copy)
    expect(p).toMatchObject({ letter: 'E', tableSampleSize: 13, sampleSize: 13, hundredPercent: true });
  });

  it('special level S-1, large lot (D at 2.5 ↑ → C, n 5, 0/1)', () => {
    // MIL-STD-105E Table I: lot 100 000 at S-1 is D; II-A published copy: D at 2.5 is ↑, C at 2.5 is 0/1
    expect(plan({ lotSize: 100000, level: 'S-1', aql: '2.5', severity: 'normal' })).toMatchObject({
      lookedUpLetter: 'D',
      letter: 'C',
      sampleSize: 5,
      acceptance: 0,
      rejection: 1,
    });
  });

  it('nonconformities per 100 items: A at 1000 is 30/31, C at 650 is 44/45, C at 1000 ↑ → B 44/45', () => {
    // a second MIL-STD-105E II-A published copy: rows A–E carry 30/31 and 44/45, row A ends at 30/31
    expect(plan({ lotSize: 5, level: 'II', aql: '1000', severity: 'normal' })).toMatchObject({ acceptance: 30, rejection: 31 });
    expect(plan({ lotSize: 20, level: 'II', aql: '650', severity: 'normal' })).toMatchObject({ letter: 'C', acceptance: 44, rejection: 45 });
    expect(plan({ lotSize: 20, level: 'II', aql: '1000', severity: 'normal' })).toMatchObject({
      letter: 'B',
      sampleSize: 3,
      acceptance: 44,
      rejection: 45,
    });
  });

  it('smallest AQL: R at 0.010 ↑ → Q, n 1250, 0/1', () => {
    // from memory (Table 2-A lower-left region)
    expect(plan({ lotSize: 600000, level: 'III', aql: '0.010', severity: 'normal' })).toMatchObject({
      lookedUpLetter: 'R',
      letter: 'Q',
      sampleSize: 1250,
      acceptance: 0,
      rejection: 1,
    });
  });

  it('says there is no plan when the arrow points off the table (A at 10 is ↑ in the top row)', () => {
    // MIL-STD-105E II-A published copy shows ↑ at A, AQL 10; nothing is above row A.
    const result = findSamplingPlan({ lotSize: 5, level: 'II', aql: '10', severity: 'normal' });
    expect(result.ok).toBe(false);
    if (!result.ok) {
      expect(result.lookedUpLetter).toBe('A');
      expect(result.reason).toMatch(/no plan for code letter A at AQL 10/);
    }
  });
});

describe('tightened inspection (ISO 2859-1:1999 Table 2-B)', () => {
  it.each<[number, Aql, string, string, number, number, number, 'up' | 'down' | null]>([
    // lot, AQL, looked-up letter, plan letter, n, Ac, Re, arrow — MIL-STD-105E II-B published copy
    [2000, '0.65', 'K', 'K', 125, 1, 2, null],
    [5000, '6.5', 'L', 'L', 200, 18, 19, null],
    [3000, '15', 'K', 'J', 80, 18, 19, 'up'],
    [300, '0.65', 'H', 'K', 125, 1, 2, 'down'],
    [100, '1.0', 'F', 'F', 20, 0, 1, null],
    [200, '15', 'G', 'G', 32, 8, 9, null],
  ])('lot %i, level II, AQL %s: %s → %s, n %i, Ac %i Re %i', (lotSize, aql, looked, letter, n, ac, re, arrow) => {
    expect(plan({ lotSize, level: 'II', aql, severity: 'tightened' })).toMatchObject({
      table: 'ISO 2859-1:1999 Table 2-B',
      lookedUpLetter: looked,
      letter,
      sampleSize: n,
      acceptance: ac,
      rejection: re,
      arrow,
    });
  });

  it('top right: B at 1000 is 41/42 (from memory, not checked against II-B)', () => {
    expect(plan({ lotSize: 10, level: 'II', aql: '1000', severity: 'tightened' })).toMatchObject({ acceptance: 41, rejection: 42 });
  });
});

describe('reduced inspection (derived: ISO 2859-1:1999 removes the gap, Re = Ac + 1; cells not checked against Table 2-C)', () => {
  it('uses the reduced sample sizes (K → 50) and follows arrows within the reduced table', () => {
    // K at 0.65 reduced: ↓ → L, n 80, 1/2 (derived from Table 2-A row H, n 50 … not checked)
    expect(plan({ lotSize: 2000, level: 'II', aql: '0.65', severity: 'reduced' })).toMatchObject({
      table: 'ISO 2859-1:1999 Table 2-C',
      lookedUpLetter: 'K',
      letter: 'L',
      sampleSize: 80,
      acceptance: 1,
      rejection: 2,
      arrow: 'down',
    });
  });

  it.each<[number, Aql, string, number, number, number]>([
    // derived, not checked against any printed reduced table
    [5000, '2.5', 'L', 80, 5, 6],
    [10, '6.5', 'B', 2, 0, 1],
    [50000, '1.0', 'N', 200, 5, 6],
  ])('lot %i, level II, AQL %s: %s, n %i, Ac %i Re %i', (lotSize, aql, letter, n, ac, re) => {
    expect(plan({ lotSize, level: 'II', aql, severity: 'reduced' })).toMatchObject({
      letter,
      sampleSize: n,
      acceptance: ac,
      rejection: re,
    });
  });

  it('every reduced plan has Re = Ac + 1 (ISO 2859-1:1999 approach to Table 2-C; MIL-STD-105E and Z1.4-2003 Table II-C have gaps)', () => {
    for (const letter of codeLetters) {
      for (const aql of aqlValues) {
        const cell = tableCell('reduced', letter, aql);
        if (cell.kind === 'plan') expect(cell.rejection).toBe(cell.acceptance + 1);
      }
    }
  });
});

describe('cells checked against MIL-STD-105E published copies, arrows included', () => {
  const down = { kind: 'down' };
  const up = { kind: 'up' };
  const plan01 = (ac: number) => ({ kind: 'plan', acceptance: ac, rejection: ac + 1 });

  it.each<[CodeLetter, Aql, object]>([
    ['A', '6.5', plan01(0)],
    ['A', '10', up],
    ['A', '15', down],
    ['E', '1.5', up],
    ['E', '2.5', down],
    ['E', '15', plan01(5)],
    ['H', '0.65', down],
    ['K', '15', up],
    ['Q', '1.0', plan01(21)],
    ['Q', '1.5', up],
  ])('MIL-STD-105E Table II-A (same plans as ISO 2859-1:1999 Table 2-A): %s at AQL %s', (letter, aql, cell) => {
    expect(tableCell('normal', letter, aql)).toEqual(cell);
  });

  it.each<[CodeLetter, Aql, object]>([
    ['A', '6.5', down],
    ['A', '10', down],
    ['B', '6.5', plan01(0)],
    ['B', '10', down],
    ['G', '0.65', plan01(0)],
    ['G', '1.0', down],
    ['G', '15', plan01(8)],
    ['K', '10', plan01(18)],
    ['K', '15', up],
    ['L', '0.65', plan01(2)],
  ])('MIL-STD-105E Table II-B (same plans as ISO 2859-1:1999 Table 2-B): %s at AQL %s', (letter, aql, cell) => {
    expect(tableCell('tightened', letter, aql)).toEqual(cell);
  });

  it('tightened, code letter A at AQL 10 follows the arrow down to D (n 8, Ac 1 Re 2; a lot of 5 is inspected whole)', () => {
    // MIL-STD-105E Table II-B published copy: A, B and C at 10 are one down arrow ending at D's 1/2.
    expect(plan({ lotSize: 5, level: 'II', aql: '10', severity: 'tightened' })).toMatchObject({
      lookedUpLetter: 'A',
      letter: 'D',
      tableSampleSize: 8,
      acceptance: 1,
      rejection: 2,
      arrow: 'down',
      hundredPercent: true,
    });
  });
});

describe('the lot decision', () => {
  it('accepts at Ac or fewer and rejects at Re or more (ISO 2859-1:1999 clause 11.1.1)', () => {
    expect(judgeSample({ acceptance: 2, rejection: 3 }, 2)).toBe('accept');
    expect(judgeSample({ acceptance: 2, rejection: 3 }, 3)).toBe('reject');
    expect(judgeSample({ acceptance: 0, rejection: 1 }, 0)).toBe('accept');
  });

  it('a count inside a Z1.4 reduced gap accepts the lot and reinstates normal inspection', () => {
    // ANSI/ASQ Z1.4-2003 clauses 8.3.4(b) and 10.1.4 (clause numbers from memory); the rule itself is
    // restated in a published AQL inspection manual's notes on the Z1.4 reduced tables. The plan
    // Ac 1 Re 3 is from memory of Table II-C.
    expect(judgeSample({ acceptance: 1, rejection: 3 }, 2)).toBe('accept_and_reinstate_normal');
  });
});

describe('the encoded tables hold together (structure of the ISO 2859-1:1999 master tables)', () => {
  const letters = codeLetters;

  it('acceptance numbers never fall as the AQL grows along a row or the sample grows down a column', () => {
    for (const severity of severities) {
      for (const letter of letters) {
        let last = -1;
        for (const aql of aqlValues) {
          const cell = tableCell(severity, letter, aql);
          if (cell.kind !== 'plan') continue;
          expect(cell.acceptance, `${severity} ${letter} ${aql}`).toBeGreaterThanOrEqual(last);
          last = cell.acceptance;
        }
      }
      for (const aql of aqlValues) {
        let last = -1;
        for (const letter of letters) {
          const cell = tableCell(severity, letter, aql);
          if (cell.kind !== 'plan') continue;
          expect(cell.acceptance, `${severity} ${letter} ${aql}`).toBeGreaterThanOrEqual(last);
          last = cell.acceptance;
        }
      }
    }
  });

  it('tightened never accepts more than normal for the same letter and AQL', () => {
    for (const letter of letters) {
      for (const aql of aqlValues) {
        const normal = tableCell('normal', letter, aql);
        const tightened = tableCell('tightened', letter, aql);
        if (normal.kind === 'plan' && tightened.kind === 'plan') {
          expect(tightened.acceptance).toBeLessThanOrEqual(normal.acceptance);
        }
      }
    }
  });

  it('every arrow leads to a plan except at the known edge cells', () => {
    const dead: string[] = [];
    for (const severity of severities satisfies readonly Severity[]) {
      for (const letter of letters) {
        for (const aql of aqlValues) {
          // A lot size that yields this letter at level II or III is not needed: walk the grid directly.
          const lot = lotFor(letter);
          const level: InspectionLevel = letter === 'R' ? 'III' : 'II';
          const result = findSamplingPlan({ lotSize: lot, level, aql, severity });
          if (!result.ok) dead.push(`${severity} ${letter} ${aql}`);
        }
      }
    }
    // Top row ↑ and bottom row ↓ cells, plus the reduced 0.010 column, whose plan would need a
    // sample larger than the 800 of code letter R. The tightened table's code letter S (3150)
    // is not encoded, so its two cells end at the edge here too.
    expect(dead).toEqual([
      'normal A 10',
      'normal R 0.015',
      'tightened Q 0.025',
      'tightened R 0.015',
      'tightened R 0.025',
      ...letters.flatMap((l) => [
        `reduced ${l} 0.010`,
        ...(['A', 'B', 'C'].includes(l) ? [`reduced ${l} 10`] : []),
        ...(l === 'R' ? ['reduced R 0.040'] : []),
      ]),
    ]);
  });
});

function lotFor(letter: string): number {
  const lots: Record<string, number> = {
    A: 5, B: 10, C: 20, D: 40, E: 60, F: 100, G: 200, H: 300, J: 800,
    K: 2000, L: 5000, M: 20000, N: 50000, P: 200000, Q: 600000, R: 600000,
  };
  return lots[letter] as number;
}
