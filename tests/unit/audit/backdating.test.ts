import { readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';

/*
 * 21 CFR 11.10(e): audit entries are "computer-generated, time-stamped" by the system. Only the demo
 * seed may tell the write path another time (its stories happened over months), through
 * lib/clock.ts's recordedAt; no application code may, and the seed itself writes history, audit
 * entries and signatures only through the write path, never by hand.
 */

const root = path.resolve(__dirname, '../../..');

function sources(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) => {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) return sources(full);
    return /\.(ts|tsx|mts|mjs)$/.test(entry.name) ? [full] : [];
  });
}

// Code only: comments may name these functions to explain them.
const withoutComments = (text: string) => text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');

const files = ['app', 'lib', 'components', 'workflows', 'scripts', 'db']
  .flatMap((d) => sources(path.join(root, d)))
  .map((f) => ({ rel: path.relative(root, f), text: withoutComments(readFileSync(f, 'utf8')) }));
const inSeed = (rel: string) => rel.startsWith(`scripts${path.sep}seed${path.sep}`);

describe('back-dated writes', () => {
  it('scans the application code and the seed', () => {
    expect(files.length).toBeGreaterThan(50);
    expect(files.filter((f) => inSeed(f.rel)).length).toBeGreaterThan(5);
  });

  it('are asked for only by the demo seed, through recordedAt', () => {
    const callers = files.filter((f) => f.rel !== path.join('lib', 'clock.ts') && /\brecordedAt\s*\(/.test(f.text)).map((f) => f.rel);
    expect(callers.length).toBeGreaterThan(0);
    expect(callers.filter((rel) => !inSeed(rel))).toEqual([]);
  });

  it('set the rows’ clock only from lib/clock.ts', () => {
    const users = files.filter((f) => f.rel !== path.join('db', 'clock.ts') && /\binstallRowClock\b/.test(f.text)).map((f) => f.rel);
    expect(users).toEqual([path.join('lib', 'clock.ts')]);
  });

  it('keep Node-only code out of the schema, which the pages’ bundles reach too', () => {
    const schema = files.filter((f) => f.rel.startsWith(`db${path.sep}schema`) || f.rel === path.join('db', 'clock.ts'));
    expect(schema.length).toBeGreaterThan(3);
    expect(schema.filter((f) => /from '(node:)?(async_hooks|fs|path|crypto)'/.test(f.text)).map((f) => f.rel)).toEqual([]);
  });

  it('have no side door into the audit trail any more', () => {
    expect(files.filter((f) => /writeDemoAuditAt/.test(f.text)).map((f) => f.rel)).toEqual([]);
  });

  it('leave history, audit entries and signatures to the write path in the seed', () => {
    const byHand = files.filter(
      (f) => inSeed(f.rel) && /\.insert\(\s*(stateHistory|signatures|auditEntries|auditChainHead)\b|signatureManifestHash|appendAudit/.test(f.text),
    );
    expect(byHand.map((f) => f.rel)).toEqual([]);
  });
});
