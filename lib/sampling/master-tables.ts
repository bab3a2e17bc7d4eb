/*
 * ISO 2859-1:1999 single sampling master tables, written out cell by cell as printed: one string
 * per sample size code letter, 26 cells for the AQL columns 0.010 … 1000. A cell is "Ac/Re", "↓"
 * (use the first plan below the arrow) or "↑" (use the first plan above it). Tables 2-A and 2-B
 * carry the same plans as ANSI/ASQ Z1.4-2003 Tables II-A and II-B and MIL-STD-105E (10 May 1989,
 * public domain) Tables II-A and II-B. The reduced table follows the ISO 2859-1:1999 approach,
 * where every rejection number is the acceptance number plus one; MIL-STD-105E and Z1.4 keep gaps
 * there.
 *
 * Provenance, so a reviewer knows what to check against a licensed copy of the standard:
 * - Table 1 (code letters): every lot-size row at all seven levels checked against two published
 *   reproductions of MIL-STD-105E Table I; the S-2 and S-3 columns against a third.
 * - Table 2-A: rows A–Q at AQL 0.65 … 15 checked cell by cell, arrows included, against a
 *   published copy of MIL-STD-105E Table II-A. That published copy prints ↑ at row A, AQL 10 (an
 *   arrow with no plan above it), and so does this table. The plans of every row, in order, were
 *   checked against a legible copy of MIL-STD-105E Table II-A whose arrows did not survive: row A
 *   runs 0/1 … 30/31, rows B–E 0/1 … 44/45, rows F–Q 0/1 … 21/22, row R 1/2 … 21/22. Where those
 *   plans and the arrows sit outside AQL 0.65 … 15 follows the table's diagonals and is from memory.
 * - Table 2-B: rows A–L at AQL 0.65 … 15 checked cell by cell, arrows included, against a
 *   published copy of MIL-STD-105E Table II-B. Row A at AQL 10 is ↓ there (corrected here; it was
 *   0/1), which sends code letter A on to D, n 8, 1/2. Rows M–R, the AQLs outside 0.65 … 15 and the
 *   plans 27/28 and 41/42 are from memory. The printed table has an extra code letter S (3150)
 *   below R; it could not be checked against any copy of the standard and is not encoded, so a
 *   lookup that would need it reports that the table has no plan.
 * - Table 2-C: not checked. No legible copy of MIL-STD-105E Table II-C or ISO 2859-1:1999
 *   Table 2-C could be read. The cells are derived: ISO 2859-1:1999 removes the gap, Re = Ac + 1,
 *   so each row repeats the Table 2-A row of the same sample size (A, B and C at n 2 follow row A;
 *   D at n 3 follows row B; and so on). ISO 2859-1:1999 also changed some reduced acceptance
 *   numbers, and which ones could not be checked, so treat every reduced plan as unverified.
 */

export const codeLetters = ['A', 'B', 'C', 'D', 'E', 'F', 'G', 'H', 'J', 'K', 'L', 'M', 'N', 'P', 'Q', 'R'] as const;
export type CodeLetter = (typeof codeLetters)[number];

/** Column headings: percent nonconforming up to 10, nonconformities per 100 items above. */
export const aqlValues = [
  '0.010', '0.015', '0.025', '0.040', '0.065', '0.10', '0.15', '0.25', '0.40', '0.65', '1.0', '1.5', '2.5',
  '4.0', '6.5', '10', '15', '25', '40', '65', '100', '150', '250', '400', '650', '1000',
] as const;
export type Aql = (typeof aqlValues)[number];

export const inspectionLevels = ['S-1', 'S-2', 'S-3', 'S-4', 'I', 'II', 'III'] as const;
export type InspectionLevel = (typeof inspectionLevels)[number];

/**
 * ISO 2859-1:1999 Table 1 (Z1.4-2003 Table I; MIL-STD-105E Table I): the smallest lot size of each row and its code
 * letter for S-1, S-2, S-3, S-4, I, II, III in that order.
 */
// prettier-ignore
export const codeLetterRows: readonly { from: number; letters: string }[] = [
  { from: 2,       letters: 'AAAAAAB' },
  { from: 9,       letters: 'AAAAABC' },
  { from: 16,      letters: 'AABBBCD' },
  { from: 26,      letters: 'ABBCCDE' },
  { from: 51,      letters: 'BBCCCEF' },
  { from: 91,      letters: 'BBCDDFG' },
  { from: 151,     letters: 'BCDEEGH' },
  { from: 281,     letters: 'BCDEFHJ' },
  { from: 501,     letters: 'CCEFGJK' },
  { from: 1201,    letters: 'CDEGHKL' },
  { from: 3201,    letters: 'CDFGJLM' },
  { from: 10001,   letters: 'CDFHKMN' },
  { from: 35001,   letters: 'DEGJLNP' },
  { from: 150001,  letters: 'DEGJMPQ' },
  { from: 500001,  letters: 'DEHKNQR' },
];

/** Sample size per code letter: Tables 2-A and 2-B (normal, tightened) and 2-C (reduced). */
// prettier-ignore
export const normalSampleSizes: Record<CodeLetter, number> = {
  A: 2, B: 3, C: 5, D: 8, E: 13, F: 20, G: 32, H: 50, J: 80, K: 125, L: 200, M: 315, N: 500, P: 800, Q: 1250, R: 2000,
};
// prettier-ignore
export const reducedSampleSizes: Record<CodeLetter, number> = {
  A: 2, B: 2, C: 2, D: 3, E: 5, F: 8, G: 13, H: 20, J: 32, K: 50, L: 80, M: 125, N: 200, P: 315, Q: 500, R: 800,
};

// prettier-ignore
export const normalTable: Record<CodeLetter, string> = {
  //      0.010 0.015 0.025 0.040 0.065  0.10  0.15  0.25  0.40  0.65   1.0   1.5   2.5   4.0   6.5    10    15    25    40    65   100   150   250   400   650  1000
  A: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31',
  B: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45',
  C: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45     ↑',
  D: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45     ↑     ↑',
  E: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45     ↑     ↑     ↑',
  F: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑',
  G: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  H: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  J: '    ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  K: '    ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  L: '    ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  M: '    ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  N: '    ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  P: '    ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  Q: '  0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  R: '    ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
};

// prettier-ignore
export const tightenedTable: Record<CodeLetter, string> = {
  //      0.010 0.015 0.025 0.040 0.065  0.10  0.15  0.25  0.40  0.65   1.0   1.5   2.5   4.0   6.5    10    15    25    40    65   100   150   250   400   650  1000
  A: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19 27/28',
  B: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19 27/28 41/42',
  C: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19 27/28 41/42     ↑',
  D: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19 27/28 41/42     ↑     ↑',
  E: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19 27/28 41/42     ↑     ↑     ↑',
  F: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑',
  G: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  H: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  J: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  K: '    ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  L: '    ↓     ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  M: '    ↓     ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  N: '    ↓     ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  P: '    ↓     ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  Q: '    ↓   0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  R: '  0/1     ↓     ↓   1/2   2/3   3/4   5/6   8/9 12/13 18/19     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
};

// prettier-ignore
export const reducedTable: Record<CodeLetter, string> = {
  //      0.010 0.015 0.025 0.040 0.065  0.10  0.15  0.25  0.40  0.65   1.0   1.5   2.5   4.0   6.5    10    15    25    40    65   100   150   250   400   650  1000
  A: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31',
  B: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31',
  C: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31',
  D: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45',
  E: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45     ↑',
  F: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45     ↑     ↑',
  G: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22 30/31 44/45     ↑     ↑     ↑',
  H: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑',
  J: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  K: '    ↓     ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  L: '    ↓     ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  M: '    ↓     ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  N: '    ↓     ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  P: '    ↓     ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  Q: '    ↓     ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
  R: '    ↓   0/1     ↑     ↓   1/2   2/3   3/4   5/6   7/8 10/11 14/15 21/22     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑     ↑',
};
