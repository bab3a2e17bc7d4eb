import { describe, expect, it } from 'vitest';
import { assessRisk } from '@/lib/risk/assess';
import { classify, isLowerClassification, type Classification } from '@/lib/risk/classify';

/*
 * Classification rules (common practice: defects classed by consequence as in ANSI/ASQ Z1.4's
 * critical / major / minor classes; the raising rules are Plumbline's): the catalogue default is the
 * floor, severity 9-10 makes it critical, action priority high (AIAG & VDA FMEA Handbook 2019, from
 * memory) makes it at least major, and a class chosen below the computed one needs a justification.
 */

const base = (defaultClassification: Classification, severity: number, occurrence: number, detection: number) => ({
  defaultClassification,
  severity,
  occurrence,
  detection,
});

describe('classify', () => {
  it('keeps the catalogue default when the score does not raise it', () => {
    const r = classify(base('minor', 3, 2, 2));
    expect(r).toMatchObject({ classification: 'minor', computed: 'minor', actionPriority: 'low', overrideJustificationRequired: false, quarantine: false });
    expect(r.reason).toBe("The defect's catalogue class is minor. The score (action priority low) does not raise it.");
  });

  it('raises to critical at severity 9, even with occurrence 1 and a low action priority', () => {
    const r = classify(base('major', 9, 1, 1));
    expect(r.actionPriority).toBe('low');
    expect(r.classification).toBe('critical');
    expect(r.reason).toContain('Raised to critical: severity 9 is 9 or 10.');
    expect(r.quarantine).toBe(true);
  });

  it('says severity confirms a defect that is critical already', () => {
    const r = classify(base('critical', 10, 3, 3));
    expect(r.classification).toBe('critical');
    expect(r.reason).toContain('Severity 10 (9-10) also makes it critical.');
  });

  it('does not raise to critical at severity 8', () => {
    expect(classify(base('minor', 8, 1, 1)).classification).toBe('minor');
  });

  it('raises a minor defect to major when action priority is high', () => {
    const r = classify(base('minor', 7, 8, 7));
    expect(r.actionPriority).toBe('high');
    expect(r.classification).toBe('major');
    expect(r.reason).toContain('Raised to major: action priority is high.');
    expect(r.quarantine).toBe(false);
  });

  it('keeps a major defect major when action priority is high', () => {
    const r = classify(base('major', 8, 8, 8));
    expect(r.classification).toBe('major');
    expect(r.reason).toContain('Action priority is high; the class stays major.');
  });

  it('never lowers a critical catalogue default because of a low score', () => {
    const r = classify(base('critical', 2, 1, 1));
    expect(r).toMatchObject({ classification: 'critical', computed: 'critical', quarantine: true, overrideJustificationRequired: false });
  });

  it('does not raise on a medium action priority', () => {
    const r = classify(base('minor', 6, 6, 6));
    expect(r.actionPriority).toBe('medium');
    expect(r.classification).toBe('minor');
  });

  it('asks for a justification when the investigator chooses a lower class', () => {
    const r = classify({ ...base('critical', 9, 2, 2), chosen: 'major' });
    expect(r).toMatchObject({ classification: 'major', computed: 'critical', overrideJustificationRequired: true, quarantine: false });
    expect(r.reason).toContain('below the computed critical: a written justification is required.');
  });

  it('accepts a higher class without a justification', () => {
    const r = classify({ ...base('minor', 3, 2, 2), chosen: 'critical' });
    expect(r).toMatchObject({ classification: 'critical', computed: 'minor', overrideJustificationRequired: false, quarantine: true });
    expect(r.reason).toContain('above the computed minor.');
  });

  it('treats choosing the computed class, or none, as no override', () => {
    expect(classify({ ...base('major', 5, 5, 5), chosen: 'major' }).overrideJustificationRequired).toBe(false);
    expect(classify({ ...base('major', 5, 5, 5), chosen: null }).classification).toBe('major');
  });

  it('refuses scores outside 1-10', () => {
    expect(() => classify(base('minor', 11, 1, 1))).toThrow(RangeError);
    expect(() => classify(base('minor', 1, 0, 1))).toThrow(RangeError);
    expect(() => classify(base('minor', 1, 1, 1.5))).toThrow(RangeError);
  });

  it('orders the classes minor < major < critical', () => {
    expect(isLowerClassification('minor', 'major')).toBe(true);
    expect(isLowerClassification('major', 'critical')).toBe(true);
    expect(isLowerClassification('critical', 'minor')).toBe(false);
    expect(isLowerClassification('major', 'major')).toBe(false);
  });
});

describe('assessRisk', () => {
  it('returns RPN, action priority, matrix cell and classification together', () => {
    const a = assessRisk(base('major', 7, 4, 6));
    expect(a.rpn).toBe(168); // IEC 60812:2018
    expect(a.actionPriority.priority).toBe('medium'); // AIAG & VDA FMEA Handbook 2019, AP table, S 7-8 / O 4-5 / D 5-6 
    expect(a.matrix).toMatchObject({ severity: { level: 4 }, probability: { level: 2 }, zone: 'medium' }); // common practice
    expect(a.classification.classification).toBe('major');
  });
});
