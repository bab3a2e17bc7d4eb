import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

/*
 * One writer (common practice for keeping a lock order; 21 CFR 11.10(e) for the audit trail it
 * guards): record rows are locked only by lib/records, which takes them in one order (record row,
 * its children, other rows in id order, counters, the audit-chain head last) and retries what the
 * database aborts. A `.for('update')` or a raw `FOR UPDATE` anywhere else is a second writer that
 * can deadlock against it or skip its checks, and so is a direct call of writeAudit outside the
 * services that own the trail. The source is parsed, so comments and prose about locks do not count.
 */

const root = path.resolve(__dirname, '../../..');

/** Where a row lock may be taken, and why there. */
const lockAllowed: Record<string, string> = {
  'lib/records/': 'the write path: record rows, rules across records, settings keys',
  'lib/audit/index.ts': 'the audit-chain head, the last lock of every write',
  'lib/mail/worker.ts': 'outbox claims, FOR UPDATE SKIP LOCKED',
  'lib/records/numbers.ts': 'record counters',
};

/** Who may call writeAudit: the write path, the trail itself and the signatures it records. */
const auditAllowed = ['lib/records/', 'lib/audit/', 'lib/signatures/'];

/*
 * Outside the product, two kinds of seeding write audit entries with the rows they insert: the
 * demo's master data, for which the product has no command yet (products, fillers, the defect
 * catalogue, batches; everything with a command goes through it), and the benchmark seeders that
 * insert hundreds of thousands of synthetic rows. Nothing else may.
 */
const seedAuditAllowed = ['scripts/seed/master-data.ts', 'scripts/seed/bulk.ts', 'scripts/seed/bulk-deviations.ts'];

const skipped = new Set(['node_modules', 'tests', 'drizzle', '.next', '.next-test', '.data', '.git', 'coverage']);

function sources(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    if (skipped.has(entry.name)) return [];
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return sources(full);
    return /\.(ts|tsx|mts|cts)$/.test(entry.name) && !entry.name.endsWith('.d.ts') ? [full] : [];
  });
}

interface Finding {
  file: string;
  line: number;
  what: string;
}

const isAllowed = (file: string, prefixes: readonly string[]) => prefixes.some((p) => (p.endsWith('/') ? file.startsWith(p) : file === p));

/** Row locks and writeAudit calls in one file's code (not its comments). */
function findLocksAndAuditWrites(file: string, text: string): { locks: Finding[]; audits: Finding[] } {
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true, file.endsWith('x') ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const locks: Finding[] = [];
  const audits: Finding[] = [];
  const at = (node: ts.Node) => source.getLineAndCharacterOfPosition(node.getStart(source)).line + 1;
  const visit = (node: ts.Node): void => {
    if (ts.isCallExpression(node)) {
      const callee = node.expression;
      const first = node.arguments[0];
      if (
        ts.isPropertyAccessExpression(callee) &&
        callee.name.text === 'for' &&
        first &&
        (ts.isStringLiteral(first) || ts.isNoSubstitutionTemplateLiteral(first)) &&
        /^update$/i.test(first.text)
      ) {
        locks.push({ file, line: at(node), what: ".for('update')" });
      }
      const name = ts.isIdentifier(callee) ? callee.text : ts.isPropertyAccessExpression(callee) ? callee.name.text : null;
      if (name === 'writeAudit') audits.push({ file, line: at(node), what: 'writeAudit(...)' });
    }
    // Raw SQL (sql`... FOR UPDATE`, or a query string handed to the driver), written in capitals
    // as SQL is here, so an English sentence with "for update" in it is not taken for one.
    const isText =
      ts.isStringLiteral(node) || ts.isNoSubstitutionTemplateLiteral(node) || ts.isTemplateHead(node) || ts.isTemplateMiddle(node) || ts.isTemplateTail(node);
    if (isText && /\bFOR\s+UPDATE\b/.test(node.text)) locks.push({ file, line: at(node), what: 'FOR UPDATE in SQL' });
    ts.forEachChild(node, visit);
  };
  visit(source);
  return { locks, audits };
}

describe('row locks and audit writes outside lib/records', () => {
  const files = sources(root).map((f) => path.relative(root, f).split(path.sep).join('/'));
  const found = files.map((file) => findLocksAndAuditWrites(file, readFileSync(path.join(root, file), 'utf8')));
  const locks = found.flatMap((f) => f.locks);
  const audits = found.flatMap((f) => f.audits);
  const where = (list: Finding[]) => list.map((f) => `${f.file}:${f.line} ${f.what}`);

  it('scans the whole source tree and finds the locks that are meant to be there', () => {
    expect(files.length).toBeGreaterThan(100);
    for (const dir of ['app/', 'lib/', 'components/', 'workflows/', 'scripts/', 'db/']) {
      expect(files.some((f) => f.startsWith(dir))).toBe(true);
    }
    // A detector that sees nothing would pass the tests below without checking anything.
    const lockFiles = new Set(locks.map((l) => l.file));
    for (const file of ['lib/records/rows.ts', 'lib/audit/index.ts', 'lib/mail/worker.ts']) expect(lockFiles).toContain(file);
  });

  it('tells a lock in code from one in a comment', () => {
    const sample = [
      "// rows are read .for('update') by the write path; FOR UPDATE is said here only",
      "const a = await tx.select().from(users).where(eq(users.id, 1)).for('update');",
      "const b = await tx.execute(sql`SELECT id FROM settings WHERE k = ${k} FOR UPDATE`);",
      "const c = await q.for('update', { skipLocked: true });",
      "await writeAudit(tx, entry);",
    ].join('\n');
    const { locks: l, audits: a } = findLocksAndAuditWrites('sample.ts', sample);
    expect(l.map((f) => f.line)).toEqual([2, 3, 4]);
    expect(a.map((f) => f.line)).toEqual([5]);
  });

  it("takes row locks only in lib/records, the audit-chain head, the mail worker's claims and the counters", () => {
    expect(where(locks.filter((l) => !isAllowed(l.file, Object.keys(lockAllowed))))).toEqual([]);
  });

  it('writes audit entries only through lib/records, lib/audit and lib/signatures (the demo seed aside)', () => {
    const outside = audits.filter((a) => !seedAuditAllowed.includes(a.file) && !isAllowed(a.file, auditAllowed));
    expect(where(outside)).toEqual([]);
  });
});
