import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/*
 * 21 CFR 11.10(d) (limit system access to authorised individuals) and OWASP ASVS 4.0.3 V4.1.1
 * (access control enforced on the server): every page of the signed-in app checks the session
 * itself. The layout cannot be relied on, since client-side navigations do not re-render it.
 */

const appGroup = path.resolve(__dirname, '../../../app/(app)');

function pages(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return pages(full);
    return entry.name === 'page.tsx' ? [full] : [];
  });
}

describe('signed-in pages', () => {
  const found = pages(appGroup);

  it('finds the pages', () => {
    expect(found.length).toBeGreaterThan(5);
  });

  it.each(found.map((f) => [path.relative(appGroup, f), f]))('%s calls requirePageUser', (_name, file) => {
    expect(readFileSync(file, 'utf8')).toMatch(/await requirePageUser\(/);
  });
});
