import {
  type Aql,
  aqlValues,
  type CodeLetter,
  codeLetterRows,
  codeLetters,
  type InspectionLevel,
  inspectionLevels,
  normalSampleSizes,
  normalTable,
  reducedSampleSizes,
  reducedTable,
  tightenedTable,
} from './master-tables';

/*
 * Single sampling plan lookup per ISO 2859-1:1999 (clause 10 and Tables 1, 2-A, 2-B, 2-C). The
 * code letter comes from the lot size and inspection level; the master table for the severity
 * gives the plan at that letter and AQL, or an arrow to follow. Following an arrow takes the
 * whole plan it points to, sample size and code letter included, which is the step people most
 * often get wrong by hand (keeping the original sample size with the new Ac/Re).
 */

export const severities = ['normal', 'tightened', 'reduced'] as const;
export type Severity = (typeof severities)[number];

export const severityLabels: Record<Severity, string> = {
  normal: 'Normal',
  tightened: 'Tightened',
  reduced: 'Reduced',
};

export const tableNames: Record<Severity, string> = {
  normal: 'ISO 2859-1:1999 Table 2-A',
  tightened: 'ISO 2859-1:1999 Table 2-B',
  reduced: 'ISO 2859-1:1999 Table 2-C',
};

export type TableCell = { kind: 'plan'; acceptance: number; rejection: number } | { kind: 'down' } | { kind: 'up' };

function parseRow(row: string): TableCell[] {
  return row
    .trim()
    .split(/\s+/)
    .map((token): TableCell => {
      if (token === '↓') return { kind: 'down' };
      if (token === '↑') return { kind: 'up' };
      const [ac, re] = token.split('/');
      return { kind: 'plan', acceptance: Number(ac), rejection: Number(re) };
    });
}

function parseTable(table: Record<CodeLetter, string>): TableCell[][] {
  return codeLetters.map((letter) => parseRow(table[letter]));
}

const grids: Record<Severity, TableCell[][]> = {
  normal: parseTable(normalTable),
  tightened: parseTable(tightenedTable),
  reduced: parseTable(reducedTable),
};

const sampleSizes: Record<Severity, Record<CodeLetter, number>> = {
  normal: normalSampleSizes,
  tightened: normalSampleSizes,
  reduced: reducedSampleSizes,
};

/** The cell as printed, for tests and for showing the table. */
export function tableCell(severity: Severity, letter: CodeLetter, aql: Aql): TableCell {
  return cellAt(grids[severity], codeLetters.indexOf(letter), aqlValues.indexOf(aql)) as TableCell;
}

function cellAt(grid: TableCell[][], row: number, column: number): TableCell | undefined {
  return grid[row]?.[column];
}

/** ISO 2859-1:1999 Table 1. Lots below 2 are not in the table. */
export function codeLetterFor(lotSize: number, level: InspectionLevel): CodeLetter {
  if (!Number.isInteger(lotSize) || lotSize < 2) throw new RangeError('Lot size must be a whole number of at least 2.');
  const row = codeLetterRows.findLast((r) => lotSize >= r.from) as (typeof codeLetterRows)[number];
  return row.letters[inspectionLevels.indexOf(level)] as CodeLetter;
}

export interface SamplingPlan {
  table: string;
  severity: Severity;
  aql: Aql;
  /** The code letter Table 1 gave for the lot. */
  lookedUpLetter: CodeLetter;
  /** The code letter of the plan used, after any arrow. */
  letter: CodeLetter;
  /** The sample size the table gives for that plan. */
  tableSampleSize: number;
  /** How many units to inspect: the table's sample size, or the whole lot when that is smaller. */
  sampleSize: number;
  acceptance: number;
  rejection: number;
  arrow: 'up' | 'down' | null;
  hundredPercent: boolean;
  notes: string[];
}

export type PlanLookup =
  | { ok: true; plan: SamplingPlan }
  | { ok: false; table: string; severity: Severity; aql: Aql; lookedUpLetter: CodeLetter; reason: string };

export interface PlanQuery {
  lotSize: number;
  level: InspectionLevel;
  aql: Aql;
  severity: Severity;
}

export function findSamplingPlan({ lotSize, level, aql, severity }: PlanQuery): PlanLookup {
  const table = tableNames[severity];
  const lookedUpLetter = codeLetterFor(lotSize, level);
  const column = aqlValues.indexOf(aql);
  const grid = grids[severity];
  let row = codeLetters.indexOf(lookedUpLetter);
  let cell = cellAt(grid, row, column);
  const arrow = cell?.kind === 'plan' ? null : (cell as TableCell).kind as 'up' | 'down';

  while (cell && cell.kind !== 'plan') {
    row += cell.kind === 'down' ? 1 : -1;
    cell = cellAt(grid, row, column);
  }
  if (!cell) {
    return {
      ok: false,
      table,
      severity,
      aql,
      lookedUpLetter,
      reason:
        `${table} has no plan for code letter ${lookedUpLetter} at AQL ${aql}: its arrow points past the edge ` +
        'of the table. Inspect the whole lot, or choose another inspection level as the site procedure allows.',
    };
  }

  const letter = codeLetters[row] as CodeLetter;
  const tableSampleSize = sampleSizes[severity][letter];
  const hundredPercent = tableSampleSize >= lotSize;
  const notes: string[] = [];
  if (arrow) {
    notes.push(
      `${table} shows an arrow ${arrow === 'down' ? 'down (↓)' : 'up (↑)'} at code letter ${lookedUpLetter}, ` +
        `AQL ${aql}: the first plan ${arrow === 'down' ? 'below' : 'above'} it is code letter ${letter}, ` +
        `sample size ${tableSampleSize}, Ac ${cell.acceptance}, Re ${cell.rejection}. ` +
        `The sample size is that plan's, not the ${sampleSizes[severity][lookedUpLetter]} of code letter ${lookedUpLetter}.`,
    );
  }
  if (severity === 'reduced') {
    notes.push(
      'Reduced-inspection plans are derived from the normal table (Re = Ac + 1) and have not been checked against ' +
        'a copy of ISO 2859-1:1999 Table 2-C: confirm this plan against the site’s licensed copy before relying on it.',
    );
  }
  if (hundredPercent) {
    notes.push(
      `The sample size (${tableSampleSize}) equals or exceeds the lot (${lotSize}): inspect every unit in the lot (100 % inspection).`,
    );
  }
  return {
    ok: true,
    plan: {
      table,
      severity,
      aql,
      lookedUpLetter,
      letter,
      tableSampleSize,
      sampleSize: hundredPercent ? lotSize : tableSampleSize,
      acceptance: cell.acceptance,
      rejection: cell.rejection,
      arrow,
      hundredPercent,
      notes,
    },
  };
}

export type SampleVerdict = 'accept' | 'reject' | 'accept_and_reinstate_normal';

/**
 * The lot decision from the count of nonconforming units (or nonconformities) in the sample.
 * With ISO 2859-1:1999 plans Re is always Ac + 1, so only accept or reject can come out. A plan
 * with a gap (ANSI/ASQ Z1.4-2003 Table II-C) gives the third outcome for a count between them:
 * the lot is accepted and normal inspection is reinstated.
 */
export function judgeSample(plan: { acceptance: number; rejection: number }, count: number): SampleVerdict {
  if (count <= plan.acceptance) return 'accept';
  if (count >= plan.rejection) return 'reject';
  return 'accept_and_reinstate_normal';
}
