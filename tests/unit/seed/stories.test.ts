import { afterEach, describe, expect, it, vi } from 'vitest';
import { planDemoCapas } from '@/scripts/seed/capas';
import { planDemoComplaints } from '@/scripts/seed/complaints';
import { buildDemoDeviations } from '@/scripts/seed/deviations';
import { demoSeedState, seedCompletedKey, seedStartedKey } from '@/scripts/seed/markers';
import { buildDemoScenario, scenarioEnd, scenarioStart } from '@/scripts/seed/scenario';

/*
 * The demo's CAPA and complaint stories as the seed plans them, before any of it reaches the
 * product: the same every time, inside the scenario, in order, and given to people the record kinds'
 * segregation of duties lets take each step (lib/capa/kind.ts, lib/complaints/kind.ts; ICH Q10
 * 3.2.2 and 21 CFR 211.198(a) for why a second person decides).
 */

const scenario = buildDemoScenario();
const deviations = buildDemoDeviations(scenario);
const capas = planDemoCapas(deviations);
const complaints = planDemoComplaints(scenario, deviations);
const roleOf = new Map(scenario.users.map((u) => [u.email, u.role]));
const inScenario = (at: string) => at >= `${scenarioStart}T00:00` && at <= `${scenarioEnd}T23:59`;

describe('demo stories: determinism', () => {
  afterEach(() => vi.restoreAllMocks());

  it('plans the same CAPAs and complaints every time, without Math.random or the clock', () => {
    vi.spyOn(Math, 'random').mockImplementation(() => {
      throw new Error('Math.random used');
    });
    vi.spyOn(Date, 'now').mockImplementation(() => {
      throw new Error('Date.now used');
    });
    const again = buildDemoDeviations(buildDemoScenario());
    expect(JSON.stringify(planDemoCapas(again))).toBe(JSON.stringify(capas));
    expect(JSON.stringify(planDemoComplaints(buildDemoScenario(), again))).toBe(JSON.stringify(complaints));
  });
});

describe('demo CAPAs', () => {
  it('are thirteen, each opened by its deviation’s investigator before they sign the investigation', () => {
    expect(capas).toHaveLength(13);
    for (const c of capas) {
      const d = deviations.find((x) => x.key === c.deviation)!;
      expect(d.columns.capaRequired, c.key).toBe(true);
      expect(c.owner, c.key).toBe(d.columns.investigator);
      const signedAt = d.steps.find((s) => s.event === 'submit_for_approval')?.at;
      if (signedAt) expect(c.openedAt < signedAt, c.key).toBe(true);
    }
    // Every deviation whose investigation asks for a CAPA has one, so the product opens no others.
    const asking = deviations.filter((d) => d.steps.some((s) => s.event === 'save_investigation' && s.changes.capaRequired === true));
    expect(asking.map((d) => d.key).sort()).toEqual(capas.map((c) => c.deviation).sort());
  });

  it('take each step in order, inside the scenario, after the CAPA was opened', () => {
    for (const c of capas) {
      const times = [c.openedAt, ...c.steps.map((s) => s.at)];
      expect(times, c.key).toEqual([...times].sort());
      expect(times.every(inScenario), c.key).toBe(true);
    }
  });

  it('are approved, judged and cancelled by a QA approver with no part in them', () => {
    for (const c of capas) {
      const tied = new Set([c.owner, ...c.steps.filter((s) => s.kind === 'add_action').map((s) => s.kind === 'add_action' && s.action.owner)]);
      const completers = new Set(c.steps.filter((s) => s.kind === 'complete_action').map((s) => s.by));
      for (const s of c.steps) {
        if (s.kind === 'approve_plan') {
          expect(roleOf.get(s.by), c.key).toBe('qa_approver');
          expect(tied.has(s.by), c.key).toBe(false);
        }
        if (s.kind === 'record_effective' || s.kind === 'record_not_effective') {
          expect(tied.has(s.by) || completers.has(s.by), c.key).toBe(false);
        }
        if (s.kind === 'cancel') expect(s.by, c.key).not.toBe(c.owner);
        if (['update_plan', 'add_action', 'request_plan_approval', 'start_implementation', 'open_effectiveness_check'].includes(s.kind)) {
          expect(s.by, `${c.key} ${s.kind}`).toBe(c.owner);
        }
        if (s.kind === 'complete_action') {
          const added = c.steps.find((a) => a.kind === 'add_action' && a.round === s.round && a.index === s.index);
          expect(added && added.kind === 'add_action' && added.action.owner, c.key).toBe(s.by);
        }
      }
    }
  });
});

describe('demo complaints', () => {
  it('are twenty-two, July to November 2026, numbered in order of receipt', () => {
    expect(complaints).toHaveLength(22);
    expect(complaints.map((c) => c.number)).toEqual(complaints.map((_c, i) => `CMP-2026-${String(i + 1).padStart(4, '0')}`));
    for (const c of complaints) {
      const times = c.steps.map((s) => s.at);
      expect(times, c.key).toEqual([...times].sort());
      expect(times.every(inScenario), c.key).toBe(true);
    }
  });

  it('are closed by a QA approver who did not take them down, own them, decide them or answer them', () => {
    for (const c of complaints) {
      const close = c.steps.find((s) => s.kind === 'close');
      if (!close) continue;
      expect(roleOf.get(close.by), c.key).toBe('qa_approver');
      const others = c.steps.filter((s) => s.kind !== 'close').map((s) => s.by);
      expect(others, c.key).not.toContain(close.by);
    }
    expect(complaints.filter((c) => c.steps.some((s) => s.kind === 'close')).length).toBeGreaterThanOrEqual(10);
  });

  it('link only deviations reported on the same filler before the link is made', () => {
    const machineOf = new Map(scenario.batches.map((b) => [b.lotNumber, b.machineAssetTag]));
    const links = complaints.flatMap((c) => c.steps.flatMap((s) => (s.kind === 'link_deviation' ? [{ c, s }] : [])));
    expect(links.length).toBeGreaterThanOrEqual(5);
    for (const { c, s } of links) {
      if (s.kind !== 'link_deviation') continue;
      const d = deviations.find((x) => x.key === s.deviation)!;
      expect(machineOf.get(d.lot!), c.key).toBe(machineOf.get(c.lot!));
      expect(d.steps.find((x) => x.event === 'submit')!.at <= s.at, c.key).toBe(true);
    }
  });
});

describe('demo seed markers', () => {
  it('tell an empty database, a complete demo, a half-loaded one and a site’s own data apart', () => {
    expect(demoSeedState(0, new Set())).toBe('empty');
    expect(demoSeedState(7, new Set([seedStartedKey, seedCompletedKey]))).toBe('complete');
    expect(demoSeedState(3, new Set([seedStartedKey]))).toBe('partial');
    // Stopped before the first user: still half-loaded, never mistaken for an empty database.
    expect(demoSeedState(0, new Set([seedStartedKey]))).toBe('partial');
    expect(demoSeedState(5, new Set())).toBe('not_demo');
  });
});
