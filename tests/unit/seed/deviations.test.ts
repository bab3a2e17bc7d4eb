import { afterEach, describe, expect, it, vi } from 'vitest';
import { buildDemoDeviations, type PlannedDeviation } from '@/scripts/seed/deviations';
import { buildDemoScenario, scenarioEnd, scenarioStart } from '@/scripts/seed/scenario';
import { defaultDueDays, dueDateFor } from '@/lib/clocks/due-dates';
import { parseRecordNumber } from '@/lib/records/number-format';
import { classify } from '@/lib/risk/classify';
import { deviationStates } from '@/workflows/states';

const scenario = buildDemoScenario();
const planned = buildDemoDeviations(scenario);
const roleOf = new Map(scenario.users.map((u) => [u.email, u.role]));
const batchOf = new Map(scenario.batches.map((b) => [b.lotNumber, b]));
const defectOf = new Map(scenario.defects.map((d) => [d.code, d]));
const openStates = ['reported', 'triage', 'investigation', 'approval'];
const step = (d: PlannedDeviation, event: string) => d.steps.find((s) => s.event === event);

describe('demo deviations: determinism', () => {
  afterEach(() => vi.restoreAllMocks());

  it('builds the same deviations every time, without Math.random or the clock', () => {
    vi.spyOn(Math, 'random').mockImplementation(() => {
      throw new Error('Math.random used');
    });
    vi.spyOn(Date, 'now').mockImplementation(() => {
      throw new Error('Date.now used');
    });
    expect(JSON.stringify(buildDemoDeviations(buildDemoScenario()))).toBe(JSON.stringify(planned));
  });
});

describe('demo deviations: a working site', () => {
  it('holds about forty deviations in every state of the lifecycle', () => {
    expect(planned.length).toBeGreaterThanOrEqual(35);
    expect(planned.length).toBeLessThanOrEqual(45);
    for (const state of deviationStates) {
      expect(planned.filter((d) => d.status === state).length, state).toBeGreaterThanOrEqual(3);
    }
    // Both ways of closing: a minor one at triage and one after investigation and approval.
    expect(planned.some((d) => d.status === 'closed' && step(d, 'close_minor'))).toBe(true);
    expect(planned.some((d) => d.status === 'closed' && step(d, 'approve'))).toBe(true);
    expect(planned.some((d) => step(d, 'return_for_rework'))).toBe(true);
  });

  it('dates every step inside the scenario, in order', () => {
    for (const d of planned) {
      const times = [d.columns.occurredAt, ...d.steps.map((s) => s.at)];
      expect(times, d.key).toEqual([...times].sort());
      expect(d.columns.occurredAt >= `${scenarioStart}T00:00`, d.key).toBe(true);
      expect(times.every((t) => t <= `${scenarioEnd}T23:59`), d.key).toBe(true);
    }
  });

  it('numbers reported deviations DEV-2026-0001 onward without gaps, in order of reporting; drafts, kept or discarded, have none', () => {
    const numbered = planned.filter((d) => d.columns.number !== null);
    expect(planned.filter((d) => d.status === 'draft' || d.status === 'discarded').every((d) => d.columns.number === null)).toBe(true);
    expect(numbered.every((d) => d.status !== 'draft' && d.status !== 'discarded')).toBe(true);
    const byReporting = [...numbered].sort((a, b) => a.columns.reportedAt!.localeCompare(b.columns.reportedAt!));
    // Common practice: deviation numbers are sequential so a missing record shows as a gap.
    expect(byReporting.map((d) => parseRecordNumber(d.columns.number!))).toEqual(
      byReporting.map((_d, i) => ({ prefix: 'DEV', year: 2026, value: i + 1 })),
    );
  });

  it('gives every step to a demo user whose role may take it, and keeps duties apart (21 CFR 211.22(a): the quality unit approves or rejects; segregation of duties: common practice)', () => {
    for (const d of planned) {
      expect(['operator', 'supervisor'], d.key).toContain(roleOf.get(d.raisedBy));
      for (const s of d.steps) {
        if (['start_triage', 'record_triage', 'assign_investigation', 'submit_for_approval'].includes(s.event)) {
          expect(roleOf.get(s.by), `${d.key} ${s.event}`).toBe('qa_investigator');
        }
        if (['approve', 'close_minor', 'return_for_rework'].includes(s.event)) {
          expect(roleOf.get(s.by), `${d.key} ${s.event}`).toBe('qa_approver');
        }
        if (['approve', 'close_minor', 'cancel'].includes(s.event)) {
          expect(s.by, d.key).not.toBe(d.raisedBy);
          expect(s.by, d.key).not.toBe(d.columns.investigator);
        }
      }
      const submitted = d.steps.filter((s) => s.event === 'submit_for_approval');
      expect(submitted.every((s) => s.by === d.columns.investigator), d.key).toBe(true);
    }
  });

  it('asks for the signatures the machine asks for, with their meaning (21 CFR 11.50)', () => {
    for (const d of planned) {
      for (const s of d.steps) {
        const expected = { submit_for_approval: 'investigation_complete', approve: 'approved', close_minor: 'approved', cancel: 'approved' }[
          s.event
        ];
        expect(s.signature, `${d.key} ${s.event}`).toBe(expected ?? null);
        if (['cancel', 'close_minor', 'return_for_rework'].includes(s.event)) expect(s.reason, d.key).toBeTruthy();
      }
    }
  });

  it('scores triaged deviations with RPN = S × O × D and the class and due date the site rules give', () => {
    const triaged = planned.filter((d) => d.columns.classification !== null);
    expect(triaged.length).toBeGreaterThan(20);
    for (const d of triaged) {
      const c = d.columns;
      // IEC 60812:2018, RPN method.
      expect(c.rpn, d.key).toBe(c.severity! * c.occurrence! * c.detection!);
      const defect = defectOf.get(d.defectCode!)!;
      // Classification floor from the defect catalogue, raised by the score (common practice, lib/risk).
      expect(c.classification, d.key).toBe(
        classify({ defaultClassification: defect.defaultClassification, severity: c.severity!, occurrence: c.occurrence!, detection: c.detection! })
          .classification,
      );
      // Closure targets 15 / 30 / 30 calendar days from reporting (common practice, lib/clocks).
      expect(c.dueAt!.slice(0, 10), d.key).toBe(dueDateFor(c.reportedAt!.slice(0, 10), c.classification!, defaultDueDays));
    }
    expect(triaged.some((d) => d.columns.classification === 'critical')).toBe(true);
    expect(triaged.some((d) => d.columns.classification === 'minor')).toBe(true);
  });

  it('holds batches as their seeded status says (21 CFR 211.192: every affected batch; 211.165: release decisions)', () => {
    const holdsOf = (lot: string) => planned.flatMap((d) => d.holds.filter((h) => h.lot === lot).map((h) => ({ d, h })));
    for (const d of planned) {
      if (d.lot !== null) expect(batchOf.has(d.lot), d.key).toBe(true);
      for (const h of d.holds) {
        const batch = batchOf.get(h.lot);
        expect(batch, `${d.key} ${h.lot}`).toBeDefined();
        if (d.status === 'closed') {
          expect(h.disposition, d.key).not.toBeNull();
          expect(batch!.status, d.key).toBe(h.disposition === 'reject' ? 'rejected' : 'released');
        } else if (openStates.includes(d.status)) {
          expect(batch!.status, d.key).toBe('on_hold');
          expect(h.disposition, d.key).toBeNull();
        } else {
          expect(h.disposition, d.key).toBeNull();
        }
      }
    }
    for (const b of scenario.batches.filter((x) => x.status === 'on_hold')) {
      expect(
        holdsOf(b.lotNumber).some(({ d }) => openStates.includes(d.status)),
        `${b.lotNumber} is on hold, so an open deviation holds it`,
      ).toBe(true);
    }
    for (const b of scenario.batches.filter((x) => x.status === 'rejected')) {
      expect(holdsOf(b.lotNumber).some(({ d, h }) => d.status === 'closed' && h.disposition === 'reject'), b.lotNumber).toBe(true);
    }
    // The dented ring's batch, in the issue's own words.
    const dented = holdsOf('BW-2026-1027-B');
    expect(dented.some(({ d }) => d.ringSerial === 'BWR-0302' && openStates.includes(d.status))).toBe(true);
  });

  it('quarantines and rejects the critical foreign-matter batch (21 CFR 211.192; quarantine first: common practice)', () => {
    const critical = planned.filter((d) => d.columns.classification === 'critical');
    expect(critical.some((d) => d.defectCode === 'foreign_matter' && d.status === 'closed' && d.columns.lineStopped)).toBe(true);
    for (const d of critical.filter((x) => x.status === 'closed')) {
      expect(d.holds.length, d.key).toBeGreaterThan(0);
      expect(d.holds.every((h) => h.disposition === 'reject'), d.key).toBe(true);
    }
  });

  it('names the duplicate a cancelled deviation repeats by its number', () => {
    const duplicates = planned.filter((d) => d.status === 'cancelled' && d.columns.cancelReason?.startsWith('Duplicate'));
    expect(duplicates.length).toBeGreaterThan(0);
    for (const d of duplicates) expect(d.columns.cancelReason, d.key).toMatch(/DEV-2026-\d{4}/);
  });
});
