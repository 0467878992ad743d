import { describe, expect, it } from 'vitest';
import type { Role } from '@shared/protocol/roles';
import { decideAccess, homeFor, NO_ROLE_HOME, roleHomesFor, safeNext } from '@/router/access';

describe('homeFor', () => {
  it.each<[Role[], string]>([
    [['admin'], '/admin/people'],
    [['rail'], '/rail'],
    [['loader'], '/bridge'],
    [['deck'], '/deck'],
    [['stage-manager'], '/watch'],
  ])('sends a person holding %j to %s', (roles, home) => {
    expect(homeFor(roles)).toBe(home);
  });

  it.each<[Role[], string]>([
    [['stage-manager', 'admin'], '/admin/people'],
    [['deck', 'rail'], '/rail'],
    [['stage-manager', 'loader'], '/bridge'],
    [['stage-manager', 'deck'], '/deck'],
    [['stage-manager', 'deck', 'loader', 'rail', 'admin'], '/admin/people'],
  ])('picks the first of admin, rail, loader, deck, stage manager for %j', (roles, home) => {
    expect(homeFor(roles)).toBe(home);
  });

  it('sends a person without any role to the no-role screen', () => {
    expect(homeFor([])).toBe(NO_ROLE_HOME);
  });
});

describe('roleHomesFor', () => {
  it('lists every role home in role order, with the words shown on screen', () => {
    expect(roleHomesFor(['deck', 'admin'])).toEqual([
      { role: 'admin', label: 'Technical director', path: '/admin/people' },
      { role: 'deck', label: 'Deck crew', path: '/deck' },
    ]);
  });
});

describe('safeNext', () => {
  it('keeps an in-app path', () => {
    expect(safeNext('/rail?x=1')).toBe('/rail?x=1');
  });

  it.each(['//elsewhere.example/x', 'https://elsewhere.example', '/\\elsewhere.example', 'rail', '', undefined, 42, '/sign-in', '/sign-in?next=/rail'])(
    'refuses %j',
    (value) => {
      expect(safeNext(value)).toBeNull();
    },
  );

  it('takes the first of repeated query values', () => {
    expect(safeNext(['/deck', '/rail'])).toBe('/deck');
  });
});

describe('decideAccess', () => {
  const railPage = { fullPath: '/rail', meta: { roles: ['rail'] as Role[] } };

  it('sends someone not signed in to sign-in, remembering where they were going', () => {
    expect(decideAccess(railPage, null)).toEqual({ allow: false, redirect: { path: '/sign-in', query: { next: '/rail' } } });
  });

  it('does not add next for the landing page', () => {
    expect(decideAccess({ fullPath: '/', meta: { landing: true } }, null)).toEqual({ allow: false, redirect: '/sign-in' });
  });

  it('lets anyone open a public page', () => {
    expect(decideAccess({ fullPath: '/welcome/abc', meta: { public: true } }, null)).toEqual({ allow: true });
    expect(decideAccess({ fullPath: '/welcome/abc', meta: { public: true } }, ['rail'])).toEqual({ allow: true });
  });

  it('sends a signed-in person away from the sign-in page to their home', () => {
    expect(decideAccess({ fullPath: '/sign-in', meta: { guestOnly: true } }, ['loader'])).toEqual({ allow: false, redirect: '/bridge' });
    expect(decideAccess({ fullPath: '/sign-in', meta: { guestOnly: true } }, null)).toEqual({ allow: true });
  });

  it('sends the landing page on to the person home', () => {
    expect(decideAccess({ fullPath: '/', meta: { landing: true } }, ['stage-manager'])).toEqual({ allow: false, redirect: '/watch' });
  });

  it('lets a person with the role in', () => {
    expect(decideAccess(railPage, ['deck', 'rail'])).toEqual({ allow: true });
  });

  it('sends a person with the wrong role to their own home with a notice in words', () => {
    const decision = decideAccess({ fullPath: '/admin/people', meta: { roles: ['admin'] } }, ['deck']);
    expect(decision).toEqual({
      allow: false,
      redirect: '/deck',
      notice: 'That screen is for the technical director. Here is your own home screen.',
    });
  });

  it('lets any signed-in person open a page without role requirements', () => {
    expect(decideAccess({ fullPath: '/no-role', meta: {} }, [])).toEqual({ allow: true });
  });
});
