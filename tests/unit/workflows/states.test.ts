import { describe, expect, it } from 'vitest';
import { capas, complaints, deviations, fillingRings } from '@/db/schema';
import { capaStates, complaintStates, deviationStates, ringStates } from '@/workflows/states';

/*
 * Every lifecycle's states are one list: the database enum is built from the tuple the machine uses,
 * so a state the machine can reach is always a value the column can hold (common practice: one
 * source of truth for an enumeration).
 */

describe('workflow states and database enums', () => {
  it.each([
    ['deviations.status', deviations.status.enumValues, deviationStates],
    ['capas.status', capas.status.enumValues, capaStates],
    ['complaints.status', complaints.status.enumValues, complaintStates],
    ['filling_rings.status', fillingRings.status.enumValues, ringStates],
  ] as const)('%s holds exactly the workflow states', (_column, enumValues, states) => {
    expect([...enumValues]).toEqual([...states]);
  });

  it('writes every state key in snake_case', () => {
    for (const s of [...deviationStates, ...capaStates, ...complaintStates, ...ringStates]) {
      expect(s).toMatch(/^[a-z]+(_[a-z]+)*$/);
    }
  });
});
