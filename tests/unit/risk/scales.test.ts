import { describe, expect, it } from 'vitest';
import { riskDimensions as dbDimensions } from '@/db/schema/quality';
import {
  assertRiskScore,
  defaultRiskScales,
  isRiskScore,
  levelFor,
  riskDescriptionMaxLength,
  riskDimensions,
  riskLabelMaxLength,
} from '@/lib/risk/scales';

describe('default risk scales', () => {
  it('use the same three dimensions as the database', () => {
    expect([...riskDimensions]).toEqual([...dbDimensions]);
  });

  it.each(riskDimensions)('%s has ten steps numbered 1-10 (IEC 60812:2018 and AIAG & VDA 2019 use 1-10 rankings)', (d) => {
    expect(defaultRiskScales[d].map((l) => l.score)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10]);
  });

  it.each(riskDimensions)('%s wording fits the database columns and is not repeated', (d) => {
    const levels = defaultRiskScales[d];
    for (const l of levels) {
      expect(l.label.length).toBeGreaterThan(0);
      expect(l.label.length).toBeLessThanOrEqual(riskLabelMaxLength);
      expect(l.description.length).toBeGreaterThan(0);
      expect(l.description.length).toBeLessThanOrEqual(riskDescriptionMaxLength);
    }
    expect(new Set(levels.map((l) => l.label)).size).toBe(10);
  });

  it('anchors occurrence per 10,000 capsules, rising with the score (common practice)', () => {
    expect(defaultRiskScales.occurrence[4]!.description).toContain('1 per 10,000');
    expect(defaultRiskScales.occurrence[9]!.description).toContain('More than 200 per 10,000');
  });

  it('names the site controls on the detection scale (100 % sort, weight checks, AQL)', () => {
    const text = defaultRiskScales.detection.map((l) => l.description).join(' ');
    expect(text).toContain('100 % visual sort');
    expect(text).toContain('weight check');
    expect(text).toContain('AQL');
  });

  it('finds a step, or falls back to the number for a scale that lacks it', () => {
    expect(levelFor(defaultRiskScales, 'severity', 10).label).toBe('Wrong medicine taken');
    expect(levelFor({ ...defaultRiskScales, detection: [] }, 'detection', 4)).toEqual({ score: 4, label: '4', description: '' });
  });
});

describe('risk score checks', () => {
  it('accepts whole numbers 1-10 only', () => {
    expect(isRiskScore(1)).toBe(true);
    expect(isRiskScore(10)).toBe(true);
    expect(isRiskScore(0)).toBe(false);
    expect(isRiskScore(11)).toBe(false);
    expect(isRiskScore(2.5)).toBe(false);
    expect(isRiskScore('3')).toBe(false);
    expect(() => assertRiskScore(4, 'occurrence')).not.toThrow();
    expect(() => assertRiskScore(null, 'occurrence')).toThrow('Occurrence must be a whole number from 1 to 10 (got null).');
  });
});
