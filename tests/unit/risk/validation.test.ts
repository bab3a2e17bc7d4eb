import { describe, expect, it } from 'vitest';
import { ValidationError } from '@/lib/errors';
import { defaultRiskScales } from '@/lib/risk/scales';
import { parseInput } from '@/lib/validation/parse';
import { publishRiskScalesSchema, riskLevelFieldName, riskScalesToFields, riskScoreSchema } from '@/lib/validation/risk';

const fieldErrors = (fn: () => unknown): Record<string, string[]> => {
  try {
    fn();
  } catch (err) {
    if (err instanceof ValidationError) return err.fieldErrors;
    throw err;
  }
  throw new Error('expected a ValidationError');
};

describe('riskScoreSchema', () => {
  it('reads form strings as whole-number scores with the scale version', () => {
    expect(parseInput(riskScoreSchema, { severity: '9', occurrence: '1', detection: '10', scaleVersion: '2' })).toEqual({
      severity: 9,
      occurrence: 1,
      detection: 10,
      scaleVersion: 2,
    });
  });

  it('puts a message on each score outside 1-10 (IEC 60812:2018 rankings are 1-10)', () => {
    const e = fieldErrors(() => parseInput(riskScoreSchema, { severity: '0', occurrence: '11', detection: '2.5', scaleVersion: '1' }));
    expect(e.severity).toEqual(['Choose the severity score, a whole number from 1 to 10.']);
    expect(e.occurrence).toEqual(['Choose the occurrence score, a whole number from 1 to 10.']);
    expect(e.detection).toEqual(['Choose the detection score, a whole number from 1 to 10.']);
  });
});

describe('publishRiskScalesSchema', () => {
  const valid = () => ({ basedOnVersion: '1', note: 'Clearer wording for detection 5-6.', ...riskScalesToFields(defaultRiskScales) });

  it('turns the 60 flat fields into three scales of ten steps', () => {
    const out = parseInput(publishRiskScalesSchema, valid());
    expect(out.basedOnVersion).toBe(1);
    expect(out.levels).toEqual(defaultRiskScales);
  });

  it('trims the wording', () => {
    const out = parseInput(publishRiskScalesSchema, { ...valid(), [riskLevelFieldName('detection', 5, 'label')]: '  Weighed out  ' });
    expect(out.levels.detection[4]!.label).toBe('Weighed out');
  });

  it('names the missing or empty step next to its field', () => {
    const input: Record<string, string> = valid();
    input[riskLevelFieldName('severity', 7, 'label')] = '   ';
    delete input[riskLevelFieldName('occurrence', 3, 'description')];
    input[riskLevelFieldName('detection', 2, 'label')] = 'x'.repeat(81);
    const e = fieldErrors(() => parseInput(publishRiskScalesSchema, input));
    expect(e.severity_7_label).toEqual(['Severity 7: the short label is required.']);
    expect(e.occurrence_3_description).toEqual(['Occurrence 3: the description is required.']);
    expect(e.detection_2_label).toEqual(['Detection 2: the short label must be at most 80 characters.']);
  });

  it('asks for a note saying what changed (kept in the audit trail, 21 CFR 11.10(e))', () => {
    const e = fieldErrors(() => parseInput(publishRiskScalesSchema, { ...valid(), note: 'tweak' }));
    expect(e.note?.[0]).toMatch(/at least 10 characters/);
  });
});
