import { describe, expect, it } from 'vitest';
import {
  actionPriority,
  actionPriorityCell,
  bandIndex,
  detectionBands,
  formatBand,
  occurrenceBands,
  severityBands,
  type ActionPriority,
} from '@/lib/risk/action-priority';

/*
 * AIAG & VDA FMEA Handbook, 1st ed. (2019), action priority table for DFMEA and PFMEA — from
 * memory, not checked against the book. Written here in the handbook's layout, independently of
 * the module's nested arrays: one line per severity band × occurrence band, four letters for
 * detection 7-10, 5-6, 2-4, 1.
 *
 * Least certain cells (confirm against the book): S 4-6 / O 6-7 / D 1 (L), S 4-6 / O 4-5 / D 5-6 (L),
 * S 2-3 / O 8-10 / D 2-4 (L), S 9-10 / O 2-3 / D 5-6 (M), S 7-8 / O 4-5 / D 5-6 (M).
 */
const handbook: Record<string, string> = {
  'S9-10 O8-10': 'HHHH',
  'S9-10 O6-7': 'HHHH',
  'S9-10 O4-5': 'HHHM',
  'S9-10 O2-3': 'HMLL',
  'S9-10 O1': 'LLLL',
  'S7-8 O8-10': 'HHHH',
  'S7-8 O6-7': 'HHHM',
  'S7-8 O4-5': 'HMMM',
  'S7-8 O2-3': 'MMLL',
  'S7-8 O1': 'LLLL',
  'S4-6 O8-10': 'HHMM',
  'S4-6 O6-7': 'MMML',
  'S4-6 O4-5': 'MLLL',
  'S4-6 O2-3': 'LLLL',
  'S4-6 O1': 'LLLL',
  'S2-3 O8-10': 'MMLL',
  'S2-3 O6-7': 'LLLL',
  'S2-3 O4-5': 'LLLL',
  'S2-3 O2-3': 'LLLL',
  'S2-3 O1': 'LLLL',
  'S1 O8-10': 'LLLL',
  'S1 O6-7': 'LLLL',
  'S1 O4-5': 'LLLL',
  'S1 O2-3': 'LLLL',
  'S1 O1': 'LLLL',
};
const letter: Record<string, ActionPriority> = { H: 'high', M: 'medium', L: 'low' };

const scores = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];

describe('action priority bands', () => {
  it.each([
    ['severity', severityBands],
    ['occurrence', occurrenceBands],
    ['detection', detectionBands],
  ] as const)('the %s bands cover 1-10 once each (AIAG & VDA FMEA Handbook 2019, from memory)', (_name, bands) => {
    for (const s of scores) expect(bands.filter((b) => s >= b.from && s <= b.to)).toHaveLength(1);
    expect(bandIndex(bands, 0)).toBe(-1);
  });

  it('formats a band for display', () => {
    expect(formatBand({ from: 9, to: 10 })).toBe('9-10');
    expect(formatBand({ from: 1, to: 1 })).toBe('1');
  });
});

describe('actionPriority (AIAG & VDA FMEA Handbook 2019, DFMEA/PFMEA table, from memory)', () => {
  const cases: [number, number, number, ActionPriority, string][] = [];
  for (const sb of severityBands) {
    for (const ob of occurrenceBands) {
      const row = handbook[`S${formatBand(sb)} O${formatBand(ob)}`]!;
      detectionBands.forEach((db, i) => {
        const expected = letter[row[i]!]!;
        // Both ends of every band, so a band boundary off by one fails.
        for (const s of new Set([sb.from, sb.to]))
          for (const o of new Set([ob.from, ob.to]))
            for (const d of new Set([db.from, db.to])) cases.push([s, o, d, expected, `S${formatBand(sb)} O${formatBand(ob)} D${formatBand(db)}`]);
      });
    }
  }

  it('has a case for every one of the 100 cells', () => {
    expect(new Set(cases.map((c) => c[4])).size).toBe(100);
  });

  it.each(cases)('S=%i O=%i D=%i → %s (cell %s)', (s, o, d, expected) => {
    expect(actionPriority(s, o, d)).toBe(expected);
  });

  it('gives low for S 9-10 with O 1 whatever the detection, not "high severity is always high"', () => {
    for (const s of [9, 10]) for (const d of scores) expect(actionPriority(s, 1, d)).toBe('low');
  });

  it('gives high for S 9-10 with O 2-3 only when detection is poor (D 7-10)', () => {
    expect(actionPriority(9, 2, 7)).toBe('high');
    expect(actionPriority(10, 3, 6)).toBe('medium');
    expect(actionPriority(10, 3, 4)).toBe('low');
  });

  it('never falls when S, O or D rises (the table orders severity, then occurrence, then detection)', () => {
    const order: Record<ActionPriority, number> = { low: 0, medium: 1, high: 2 };
    for (const s of scores)
      for (const o of scores)
        for (const d of scores) {
          const here = order[actionPriority(s, o, d)];
          if (s < 10) expect(order[actionPriority(s + 1, o, d)]).toBeGreaterThanOrEqual(here);
          if (o < 10) expect(order[actionPriority(s, o + 1, d)]).toBeGreaterThanOrEqual(here);
          if (d < 10) expect(order[actionPriority(s, o, d + 1)]).toBeGreaterThanOrEqual(here);
        }
  });

  it('names the bands the score fell in', () => {
    expect(actionPriorityCell(8, 5, 6)).toEqual({
      priority: 'medium',
      severityBand: { from: 7, to: 8 },
      occurrenceBand: { from: 4, to: 5 },
      detectionBand: { from: 5, to: 6 },
    });
  });

  it.each([
    [0, 1, 1],
    [1, 11, 1],
    [1, 1, 0],
  ])('refuses S=%i O=%i D=%i outside 1-10', (s, o, d) => {
    expect(() => actionPriority(s, o, d)).toThrow(RangeError);
  });
});
