import { describe, expect, it } from 'vitest';
import { NAV_ITEMS, navItemsFor } from '../../src/layout/nav';
import { initials, roleLabel, roleWithArticle } from '../../src/utils/roles';
import { filterRows, normalizeText } from '../../src/utils/text-filter';

describe('navItemsFor', () => {
  const names = (role: Parameters<typeof navItemsFor>[0]) => navItemsFor(role).map((item) => item.routeName);

  it('shows an athlete My flights first and neither Overview, Squad nor Club when the role is athlete', () => {
    expect(names('athlete')[0]).toBe('my-flights');
    expect(names('athlete')).not.toContain('overview');
    expect(names('athlete')).not.toContain('squad');
    expect(names('athlete')).not.toContain('club');
  });

  it('shows a coach Squad but not Club when the role is coach', () => {
    expect(names('coach')).toContain('squad');
    expect(names('coach')).not.toContain('club');
  });

  it('shows an admin every entry but the athlete’s My flights when the role is admin', () => {
    expect(names('admin')).toEqual(NAV_ITEMS.map((item) => item.routeName).filter((name) => name !== 'my-flights'));
  });

  it('shows nothing when there is no club in view', () => {
    expect(navItemsFor(null)).toEqual([]);
  });
});

describe('filterRows', () => {
  const rows = [
    { name: 'Maren Holloway', role: 'admin' },
    { name: 'Teodor Quill', role: 'coach' },
    { name: 'Isla Brackwater', role: 'athlete' },
  ];

  it('keeps rows containing every word of the query in any field', () => {
    expect(filterRows(rows, 'quill coach', (r) => [r.name, r.role]).map((r) => r.name)).toEqual(['Teodor Quill']);
  });

  it('ignores case and accents when matching', () => {
    expect(normalizeText('Tëodor')).toBe('teodor');
    expect(filterRows(rows, 'TËODOR', (r) => [r.name]).map((r) => r.name)).toEqual(['Teodor Quill']);
  });

  it('returns every row when the query is blank', () => {
    expect(filterRows(rows, '   ', (r) => [r.name])).toHaveLength(3);
  });
});

describe('roles', () => {
  it('names roles as the screens show them', () => {
    expect(roleLabel('admin')).toBe('Club admin');
    expect(roleLabel(null)).toBe('');
  });

  it('puts the right article before a role when it is used in a sentence', () => {
    expect(roleWithArticle('athlete')).toBe('an athlete');
    expect(roleWithArticle('coach')).toBe('a coach');
    expect(roleWithArticle('admin')).toBe('a club admin');
  });

  it('takes the first letters of the first two words when making initials', () => {
    expect(initials('Fennick Vale Sporting Club')).toBe('FV');
    expect(initials('  isla  ')).toBe('I');
    expect(initials('')).toBe('?');
  });
});
