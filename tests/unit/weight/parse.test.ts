import { describe, expect, it } from 'vitest';
import { formatLineError, parseMasses } from '@/lib/weight/parse';

/* Reading balance output and CSV (common practice: balances print one reading a line, in g or mg). */

describe('parsing pasted masses', () => {
  it('reads one mass per line in mg, skipping blank lines, with CRLF', () => {
    expect(parseMasses('512.3\r\n\r\n498\n 505.25 ')).toEqual({ massesMg: [512.3, 498, 505.25], errors: [], notes: [] });
  });

  it('accepts decimal commas', () => {
    expect(parseMasses('512,3\n498,75 mg').massesMg).toEqual([512.3, 498.75]);
  });

  it('converts values marked g to mg', () => {
    expect(parseMasses('0.5123 g\n0,4987g\n505 mg').massesMg).toEqual([512.3, 498.7, 505]);
  });

  it('reads balance print-outs with a status prefix and a sign', () => {
    expect(parseMasses('N  + 0.5123 g\nST,GS,+  512.4 mg').massesMg).toEqual([512.3, 512.4]);
  });

  it('reads unlabelled values below 3 as grams, and says so', () => {
    const r = parseMasses('0.5123\n0.4987');
    expect(r.massesMg).toEqual([512.3, 498.7]);
    expect(r.notes[0]).toMatch(/read as grams/);
  });

  it('keeps an explicit default unit', () => {
    expect(parseMasses('0.5', { defaultUnit: 'mg' }).massesMg).toEqual([0.5]);
    expect(parseMasses('0.5', { defaultUnit: 'g' }).massesMg).toEqual([500]);
  });

  it('reports each unreadable line by number', () => {
    const r = parseMasses('512.3\nabc\n-3\n0\n1,234.5\n.5 g\n1.2.3');
    expect(r.massesMg).toEqual([512.3, 500]);
    expect(r.errors.map((e) => e.line)).toEqual([2, 3, 4, 5, 7]);
    expect(formatLineError(r.errors[0]!)).toBe('Line 2: "abc" is not a mass (expected a number, optionally followed by mg or g).');
    expect(r.errors[1]!.message).toBe('a mass must be above zero');
    expect(r.errors[2]!.message).toBe('a mass must be above zero');
    expect(r.errors[3]!.message).toMatch(/both "," and "."/);
    expect(r.errors[4]!.message).toBe('"1.2.3" has more than one decimal separator');
  });

  it('returns nothing for empty input', () => {
    expect(parseMasses('')).toEqual({ massesMg: [], errors: [], notes: [] });
  });
});

describe('parsing CSV from a balance', () => {
  it('finds the mass column by its header and reads grams from "(g)"', () => {
    const r = parseMasses('sample,time,mass (g)\n1,08:00,0.5123\n2,08:01,0.4987');
    expect(r.massesMg).toEqual([512.3, 498.7]);
    expect(r.notes).toContain('Read column "mass (g)".');
  });

  it('reads a semicolon CSV with decimal commas and a mg header', () => {
    expect(parseMasses('No;Net weight mg\n1;512,3\n2;"498,7"').massesMg).toEqual([512.3, 498.7]);
  });

  it('reads a tab-separated export', () => {
    expect(parseMasses('id\tgross\n1\t612.5\n2\t600').massesMg).toEqual([612.5, 600]);
  });

  it('lets a unit in the cell override the header', () => {
    expect(parseMasses('id,mass\n1,0.5 g\n2,500').massesMg).toEqual([500, 500]);
  });

  it('reports a header with no mass column', () => {
    const r = parseMasses('id,time\n1,08:00');
    expect(r.massesMg).toEqual([]);
    expect(r.errors[0]).toMatchObject({ line: 1, message: expect.stringMatching(/no column is named/) });
  });

  it('reports rows with an empty mass cell or a bad value', () => {
    const r = parseMasses('id,mass mg\n1,\n2\n3,heavy\n4,501');
    expect(r.massesMg).toEqual([501]);
    expect(r.errors.map((e) => [e.line, e.message])).toEqual([
      [2, 'has no value in the mass column'],
      [3, 'has no value in the mass column'],
      [4, '"heavy" is not a mass (expected a number, optionally followed by mg or g)'],
    ]);
  });
});
