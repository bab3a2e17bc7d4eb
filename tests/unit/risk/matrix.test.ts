import { describe, expect, it } from 'vitest';
import { matrixPosition, matrixProbabilityBands, matrixSeverityBands, matrixZone, type MatrixZone } from '@/lib/risk/matrix';

/*
 * ICH Q9(R1) gives no fixed matrix; this 5 × 5 grid is in its spirit and its zones are common
 * practice: severity level × probability level ≥ 15 high, 5-12 medium, ≤ 4 low.
 */
const byProduct = (s: number, p: number): MatrixZone => (s * p >= 15 ? 'high' : s * p >= 5 ? 'medium' : 'low');

describe('severity × probability matrix (in the spirit of ICH Q9(R1); zones common practice)', () => {
  const levels = [1, 2, 3, 4, 5];

  it.each(levels.flatMap((s) => levels.map((p) => [s, p, byProduct(s, p)] as const)))(
    'severity level %i × probability level %i is %s',
    (s, p, zone) => {
      expect(matrixZone(s, p)).toBe(zone);
    },
  );

  it('puts the extreme corners in the extreme zones', () => {
    expect(matrixZone(1, 1)).toBe('low');
    expect(matrixZone(5, 5)).toBe('high');
    expect(matrixZone(5, 1)).toBe('medium');
    expect(matrixZone(1, 5)).toBe('medium');
  });

  it.each([
    [0, 1],
    [6, 1],
    [1, 0],
    [1, 6],
  ])('refuses levels %i × %i outside the grid', (s, p) => {
    expect(() => matrixZone(s, p)).toThrow(RangeError);
  });

  it('groups the 1-10 scores in pairs on both axes', () => {
    for (const bands of [matrixSeverityBands, matrixProbabilityBands]) {
      expect(bands.map((b) => [b.from, b.to])).toEqual([
        [1, 2],
        [3, 4],
        [5, 6],
        [7, 8],
        [9, 10],
      ]);
      expect(bands.map((b) => b.level)).toEqual([1, 2, 3, 4, 5]);
    }
  });

  it('places a score at its band edges', () => {
    expect(matrixPosition(8, 7)).toMatchObject({ severity: { level: 4 }, probability: { level: 4 }, zone: 'high' });
    expect(matrixPosition(9, 2)).toMatchObject({ severity: { level: 5 }, probability: { level: 1 }, zone: 'medium' });
    expect(matrixPosition(2, 3)).toMatchObject({ severity: { level: 1 }, probability: { level: 2 }, zone: 'low' });
    expect(matrixPosition(6, 6)).toMatchObject({ severity: { level: 3 }, probability: { level: 3 }, zone: 'medium' });
  });

  it('refuses scores outside 1-10', () => {
    expect(() => matrixPosition(0, 5)).toThrow(RangeError);
    expect(() => matrixPosition(5, 11)).toThrow(RangeError);
  });
});
