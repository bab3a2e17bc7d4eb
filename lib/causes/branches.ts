/*
 * The six branches of the cause-and-effect (Ishikawa) diagram as used in GMP investigations
 * (the "6M": method, machine, material, measurement, people — "man" in older texts — and
 * environment — "mother nature"). Order is the order they are drawn and listed.
 */

export const causeBranches = ['method', 'machine', 'material', 'measurement', 'people', 'environment'] as const;
export type CauseBranch = (typeof causeBranches)[number];

export const branchLabels: Record<CauseBranch, string> = {
  method: 'Method',
  machine: 'Machine',
  material: 'Material',
  measurement: 'Measurement',
  people: 'People',
  environment: 'Environment',
};

export const branchQuestions: Record<CauseBranch, string> = {
  method: 'Was the procedure followed, and is it right?',
  machine: 'Settings, wear and condition of the filler and rings',
  material: 'Shells and powder: lot, maker, moisture, flow',
  measurement: 'Gauges, balances and checks: calibrated and read right?',
  people: 'Training, shift, who changed what',
  environment: 'Room humidity, temperature, cleanliness',
};
