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
 * AIAG & VDA FMEA Handbook, 1st ed. (2019), Table 'Action Priority for DFMEA and PFMEA', checked
 * against two independent published reproductions of the table, which agree on all 100 cells.
 * Written here in the handbook's layout, independently of the module's nested arrays: one block per
 * severity band, one line per occurrence band (8-10, 6-7, 4-5, 2-3, 1), four letters for detection
 * 7-10, 5-6, 2-4, 1.
 */
const handbookSeverityBlocks: Record<string, readonly [string, string, string, string, string]> = {
  //        O 8-10  O 6-7   O 4-5   O 2-3   O 1
  'S9-10': ['HHHH', 'HHHH', 'HHHM', 'HMLL', 'LLLL'],
  'S7-8': ['HHHH', 'HHHM', 'HMMM', 'MMLL', 'LLLL'],
  'S4-6': ['HHMM', 'MMML', 'MLLL', 'LLLL', 'LLLL'],
  'S2-3': ['MMLL', 'LLLL', 'LLLL', 'LLLL', 'LLLL'],
  'S1': ['LLLL', 'LLLL', 'LLLL', 'LLLL', 'LLLL'],
};
const handbookOccurrenceOrder = ['O8-10', 'O6-7', 'O4-5', 'O2-3', 'O1'] as const;
const handbook: Record<string, string> = Object.fromEntries(
  Object.entries(handbookSeverityBlocks).flatMap(([s, rows]) => rows.map((row, i) => [`${s} ${handbookOccurrenceOrder[i]}`, row])),
);
const letter: Record<string, ActionPriority> = { H: 'high', M: 'medium', L: 'low' };

const scores = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];

describe('action priority bands', () => {
  it.each([
    ['severity', severityBands],
    ['occurrence', occurrenceBands],
    ['detection', detectionBands],
  ] as const)('the %s bands cover 1-10 once each (AIAG & VDA FMEA Handbook 2019, AP table bands)', (_name, bands) => {
    for (const s of scores) expect(bands.filter((b) => s >= b.from && s <= b.to)).toHaveLength(1);
    expect(bandIndex(bands, 0)).toBe(-1);
  });

  it('formats a band for display', () => {
    expect(formatBand({ from: 9, to: 10 })).toBe('9-10');
    expect(formatBand({ from: 1, to: 1 })).toBe('1');
  });
});

describe('actionPriority (AIAG & VDA FMEA Handbook 2019, Action Priority for DFMEA and PFMEA)', () => {
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
    expect(Object.keys(handbook)).toHaveLength(25);
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

  // The cells once least certain, each checked against both reproductions named at the top.
  it.each<[number, number, number, ActionPriority, string]>([
    [5, 6, 1, 'low', 'S 4-6 / O 6-7 / D 1'],
    [5, 4, 5, 'low', 'S 4-6 / O 4-5 / D 5-6'],
    [3, 9, 3, 'low', 'S 2-3 / O 8-10 / D 2-4'],
    [9, 2, 5, 'medium', 'S 9-10 / O 2-3 / D 5-6'],
    [8, 4, 6, 'medium', 'S 7-8 / O 4-5 / D 5-6'],
  ])('S=%i O=%i D=%i → %s (AIAG & VDA FMEA Handbook 2019, AP table, cell %s)', (s, o, d, expected) => {
    expect(actionPriority(s, o, d)).toBe(expected);
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
