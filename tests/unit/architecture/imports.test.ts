import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';

/*
 * Imports run one way: app → lib → db and workflows; components take DTOs and never the database;
 * nothing imports app; db imports neither lib nor app (its settings come from config/); workflows
 * import xstate and each other only; lib has no import cycles (a cycle means two modules decide
 * together, and the order they load in starts to matter); and nothing a browser loads reaches the
 * database or a server-only module. Common practice for a layered application; the layering is the
 * project's own (shared/STYLE.md). Each import is read with the TypeScript parser, so a comment or
 * a string that looks like one does not count, and a type-only import (erased when compiled) does
 * not count as a runtime edge.
 */

const root = path.resolve(__dirname, '../../..');
const sourceDirs = ['app', 'components', 'config', 'db', 'lib', 'scripts', 'workflows'];

function filesUnder(dir: string): string[] {
  const abs = path.join(root, dir);
  if (!existsSync(abs)) return [];
  return readdirSync(abs).flatMap((name) => {
    const rel = path.join(dir, name);
    if (statSync(path.join(root, rel)).isDirectory()) return filesUnder(rel);
    return /\.(ts|tsx|mjs)$/.test(name) && !name.endsWith('.d.ts') ? [rel] : [];
  });
}

interface Edge {
  /** The specifier as written. */
  spec: string;
  /** The project file it names, or null for a package. */
  target: string | null;
  typeOnly: boolean;
}

function resolve(from: string, spec: string): string | null {
  let base: string;
  if (spec.startsWith('@/')) base = spec.slice(2);
  else if (spec.startsWith('.')) base = path.join(path.dirname(from), spec);
  else return null;
  for (const candidate of [base, `${base}.ts`, `${base}.tsx`, `${base}.mjs`, path.join(base, 'index.ts')]) {
    if (existsSync(path.join(root, candidate)) && statSync(path.join(root, candidate)).isFile()) return path.normalize(candidate);
  }
  return path.normalize(base);
}

const cache = new Map<string, { edges: Edge[]; useClient: boolean; useServer: boolean; serverOnly: boolean }>();

function parse(file: string) {
  const known = cache.get(file);
  if (known) return known;
  const text = readFileSync(path.join(root, file), 'utf8');
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true, file.endsWith('x') ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const edges: Edge[] = [];
  const add = (spec: string, typeOnly: boolean) => edges.push({ spec, target: resolve(file, spec), typeOnly });
  const visit = (node: ts.Node) => {
    if (ts.isImportDeclaration(node) && ts.isStringLiteral(node.moduleSpecifier)) {
      const clause = node.importClause;
      const allTypes =
        !!clause &&
        (clause.isTypeOnly ||
          (!clause.name && !!clause.namedBindings && ts.isNamedImports(clause.namedBindings) && clause.namedBindings.elements.length > 0 && clause.namedBindings.elements.every((e) => e.isTypeOnly)));
      add(node.moduleSpecifier.text, allTypes);
    } else if (ts.isExportDeclaration(node) && node.moduleSpecifier && ts.isStringLiteral(node.moduleSpecifier)) {
      add(node.moduleSpecifier.text, node.isTypeOnly);
    } else if (ts.isCallExpression(node) && node.expression.kind === ts.SyntaxKind.ImportKeyword && node.arguments[0] && ts.isStringLiteral(node.arguments[0])) {
      add(node.arguments[0].text, false);
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
  const first = source.statements[0];
  const directive = first && ts.isExpressionStatement(first) && ts.isStringLiteral(first.expression) ? first.expression.text : null;
  const parsed = { edges, useClient: directive === 'use client', useServer: directive === 'use server', serverOnly: edges.some((e) => e.spec === 'server-only') };
  cache.set(file, parsed);
  return parsed;
}

const files = sourceDirs.flatMap(filesUnder);
const under = (file: string | null, dir: string) => file !== null && (file === dir || file.startsWith(`${dir}/`));

function violations(from: string, rule: (edge: Edge) => string | null): string[] {
  return files
    .filter((f) => under(f, from))
    .flatMap((f) => parse(f).edges.flatMap((e) => {
      const why = rule(e);
      return why ? [`${f} imports ${e.spec}: ${why}`] : [];
    }));
}

describe('import direction', () => {
  it('finds the source files it checks', () => {
    for (const dir of sourceDirs.filter((d) => d !== 'config')) expect(files.some((f) => under(f, dir)), dir).toBe(true);
  });

  it('keeps db/ below lib/: it imports only db/, workflows/, config/ and packages', () => {
    expect(
      violations('db', (e) => (e.target && !['db', 'workflows', 'config'].some((d) => under(e.target, d)) ? 'db/ is below lib/ and app/' : null)),
    ).toEqual([]);
  });

  it('keeps workflows/ pure: xstate and each other only', () => {
    expect(violations('workflows', (e) => (e.target ? (under(e.target, 'workflows') ? null : 'workflows import no project code') : e.spec === 'xstate' ? null : 'workflows import xstate only'))).toEqual([]);
  });

  it('keeps lib/ from reaching up into app/, components/ or scripts/', () => {
    expect(violations('lib', (e) => (['app', 'components', 'scripts'].some((d) => under(e.target, d)) ? 'lib/ is below the pages and the scripts' : null))).toEqual([]);
  });

  it('keeps app/ and components/ off the database', () => {
    const offDb = (e: Edge) => (under(e.target, 'db') || e.spec === 'drizzle-orm' || e.spec.startsWith('drizzle-orm/') || e.spec === 'mysql2' ? 'pages and components read through lib/ DTOs' : null);
    expect([...violations('app', offDb), ...violations('components', offDb)]).toEqual([]);
  });

  it('has nothing import app/ but app/ itself', () => {
    const outside = files.filter((f) => !under(f, 'app'));
    const bad = outside.flatMap((f) => parse(f).edges.filter((e) => under(e.target, 'app')).map((e) => `${f} imports ${e.spec}`));
    expect(bad).toEqual([]);
  });

  it('has no import cycle in lib/ (runtime imports; type-only ones are erased)', () => {
    const libFiles = files.filter((f) => under(f, 'lib'));
    const next = (f: string) => parse(f).edges.filter((e) => !e.typeOnly && e.target && under(e.target, 'lib') && libFiles.includes(e.target)).map((e) => e.target!);
    const cycles: string[] = [];
    const state = new Map<string, 'open' | 'done'>();
    const stack: string[] = [];
    const walk = (f: string) => {
      state.set(f, 'open');
      stack.push(f);
      for (const t of next(f)) {
        if (state.get(t) === 'open') cycles.push([...stack.slice(stack.indexOf(t)), t].join(' → '));
        else if (!state.has(t)) walk(t);
      }
      stack.pop();
      state.set(f, 'done');
    };
    for (const f of libFiles) if (!state.has(f)) walk(f);
    expect(cycles).toEqual([]);
  });

  it('keeps every client bundle off db/ and server-only modules', () => {
    const clientEntries = files.filter((f) => /\.tsx?$/.test(f) && parse(f).useClient);
    expect(clientEntries.length).toBeGreaterThan(10);
    const bad: string[] = [];
    for (const entry of clientEntries) {
      const seen = new Set<string>();
      const queue: { file: string; via: string[] }[] = [{ file: entry, via: [entry] }];
      while (queue.length > 0) {
        const { file, via } = queue.shift()!;
        if (seen.has(file)) continue;
        seen.add(file);
        // A server action is called over the network; its module stays on the server.
        if (file !== entry && parse(file).useServer) continue;
        if (under(file, 'db')) bad.push(`${via.join(' → ')}: reaches the database layer`);
        else if (parse(file).serverOnly) bad.push(`${via.join(' → ')}: reaches a server-only module`);
        else {
          for (const e of parse(file).edges) {
            if (!e.typeOnly && e.target && existsSync(path.join(root, e.target))) queue.push({ file: e.target, via: [...via, e.target] });
          }
        }
      }
    }
    expect(bad).toEqual([]);
  });
});
