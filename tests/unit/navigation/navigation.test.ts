import { describe, expect, it } from 'vitest';
import { permissionTable } from '@/lib/auth/permissions';
import { roles } from '@/lib/auth/roles';
import { isCurrentSection, navEntries, navEntriesFor, safeReturnPath } from '@/lib/navigation';

describe('return address after sign-in', () => {
  // OWASP Unvalidated Redirects and Forwards Cheat Sheet: only same-site relative paths are followed.
  it.each([
    ['/deviations', '/deviations'],
    ['/batches?status=on_hold&page=2', '/batches?status=on_hold&page=2'],
    ['/admin/users/7#trail', '/admin/users/7#trail'],
  ])('keeps the same-site path %s', (input, expected) => {
    expect(safeReturnPath(input)).toBe(expected);
  });

  it.each([
    'https://evil.example/sign-in',
    '//evil.example/x',
    '/\\evil.example',
    'javascript:alert(1)',
    'deviations',
    '/sign-in?callbackUrl=/x',
    '/a\nb',
    '',
  ])('falls back to the overview for %j', (input) => {
    expect(safeReturnPath(input)).toBe('/');
  });

  it('falls back for values that are not text', () => {
    expect(safeReturnPath(null)).toBe('/');
    expect(safeReturnPath(['/deviations'])).toBe('/');
  });
});

describe('main navigation', () => {
  // 21 CFR 11.10(d)/(g): a role is offered exactly the sections its read permission opens.
  it('offers each role exactly the entries whose permission the role holds', () => {
    for (const role of roles) {
      const offered = navEntriesFor({ id: 1, role }).map((e) => e.href);
      const expected = navEntries.filter((e) => permissionTable[e.permission][role]).map((e) => e.href);
      expect(offered).toEqual(expected);
    }
  });

  it('gives Admin only to administrators, and Complaints to operators too (they read the complaints they took down)', () => {
    expect(navEntriesFor({ id: 1, role: 'admin' }).map((e) => e.label)).toContain('Admin');
    expect(navEntriesFor({ id: 1, role: 'qa_approver' }).map((e) => e.label)).not.toContain('Admin');
    expect(navEntriesFor({ id: 1, role: 'operator' }).map((e) => e.label)).toContain('Complaints');
    expect(navEntriesFor({ id: 1, role: 'operator' }).map((e) => e.label)).not.toContain('Admin');
  });

  it('marks a section current on its own page and its sub-pages only', () => {
    expect(isCurrentSection('/admin', '/admin/users/3')).toBe(true);
    expect(isCurrentSection('/capa', '/capa')).toBe(true);
    expect(isCurrentSection('/capa', '/capable')).toBe(false);
  });
});
