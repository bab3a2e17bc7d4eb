import { readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/*
 * Every route handler and page under complaints reaches complaint data only through the reads and
 * commands whose DTOs the integration tests check for personal data (tests/integration/complaints:
 * an operator, a supervisor and an administrator never get the complainant's name, contact, harm or
 * letter): listComplaints, getComplaintDetail, the commands (whose outcome is ComplaintDto, which has
 * no personal field) and the evidence reads. None reads the database itself or names a personal
 * column. Data minimisation: GDPR Art. 5(1)(c); access limited to need: EU GMP Annex 11 §12.1.
 * The trends pages are another feature's and are left out.
 */

const root = path.resolve(__dirname, '../../..');

function filesUnder(dir: string): string[] {
  const abs = path.join(root, dir);
  return readdirSync(abs).flatMap((name) => {
    const full = path.join(abs, name);
    const rel = path.join(dir, name);
    if (statSync(full).isDirectory()) return name === 'trends' ? [] : filesUnder(rel);
    return /\.(ts|tsx)$/.test(name) ? [rel] : [];
  });
}

const routes = filesUnder('app/api/complaints').filter((f) => f.endsWith('route.ts'));
const pages = filesUnder('app/(app)/complaints');
const allowedSources = [
  '@/lib/auth/permissions',
  '@/lib/auth/session',
  '@/lib/complaints/commands',
  '@/lib/complaints/detail',
  '@/lib/complaints/queries',
  '@/lib/complaints/list-query',
  '@/lib/complaints/route-id',
  '@/lib/complaints/schemas',
  '@/lib/attachments/commands',
  '@/lib/attachments/http',
  '@/lib/attachments/queries',
  '@/lib/attachments/upload-request',
  '@/lib/define-action',
  '@/lib/errors',
];
const personalColumns = /complainantName|complainantContact|harmDescription|responseText|responseSentText/;
/** The code without its comments (a route's doc comment names the fields its POST body takes). */
const code = (source: string) => source.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');

/** The body of evidenceRoutes in lib/attachments/http.ts: the GET and POST every evidence route exports. */
function sharedEvidenceHandlers(): string {
  const source = code(readFileSync(path.join(root, 'lib/attachments/http.ts'), 'utf8'));
  const start = source.indexOf('export function evidenceRoutes');
  expect(start).toBeGreaterThan(-1);
  return source.slice(start);
}

describe('complaint route handlers', () => {
  it('exist for the list, the record and each section', () => {
    expect(routes.length).toBeGreaterThanOrEqual(8);
  });

  it.each(routes)('%s asks who is calling in every handler and reads only through the checked DTOs', (file) => {
    const source = code(readFileSync(path.join(root, file), 'utf8'));
    // The evidence routes are the shared handlers of lib/attachments/http.ts: check those instead.
    const shared = /export const \{ GET, POST \} = evidenceRoutes\('complaint'\);/.test(source);
    const handlerSource = shared ? sharedEvidenceHandlers() : source;
    const handlers = [...handlerSource.matchAll(/(?:export )?async (?:function )?(GET|POST|PUT|PATCH|DELETE)\b/g)];
    expect(handlers.length).toBeGreaterThan(0);
    expect(handlerSource.match(/await requireUser\(\)/g)?.length ?? 0).toBe(handlers.length);
    const imports = [...source.matchAll(/from '([^']+)'/g)].map((m) => m[1]!);
    for (const i of imports) expect(allowedSources, `${file} imports ${i}`).toContain(i);
    expect(source).not.toMatch(personalColumns);
    expect(source).not.toMatch(/drizzle-orm|@\/db\//);
  });
});

describe('complaint pages', () => {
  it.each(pages)('%s never reads the database and shows personal data only from the personal part of the DTO', (file) => {
    const source = code(readFileSync(path.join(root, file), 'utf8'));
    expect(source).not.toMatch(/drizzle-orm|@\/db\//);
    for (const line of source.split('\n').filter((l) => personalColumns.test(l))) {
      expect(line, `${file}: ${line.trim()}`).toMatch(/personal[?!]?\./);
    }
  });
});
