import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/*
 * 21 CFR 11.10(e): audit entries are "computer-generated, time-stamped" by the system. Only the demo
 * scenario may date its entries (its stories happened over months); no application code may.
 */

const root = path.resolve(__dirname, '../../..');
const allowed = new Set(['lib/audit/index.ts']);

function sources(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return sources(full);
    return /\.(ts|tsx)$/.test(entry.name) ? [full] : [];
  });
}

describe('back-dated audit entries', () => {
  const files = ['app', 'lib', 'components', 'workflows', 'scripts'].flatMap((d) => sources(path.join(root, d)));

  it('scans the application code', () => {
    expect(files.length).toBeGreaterThan(50);
  });

  it('are written only by the demo scenario', () => {
    const users = files
      .map((f) => path.relative(root, f))
      .filter((rel) => !allowed.has(rel) && readFileSync(path.join(root, rel), 'utf8').includes('writeDemoAuditAt'));
    expect(users).toEqual([]);
  });
});
