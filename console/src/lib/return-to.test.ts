import { describe, expect, it } from 'vitest';
import { pathAfterSignIn, returnToState } from './return-to';
import type { Session } from './session';

const session = (id: string, role: string) => ({ user: { id }, role }) as unknown as Session;
const who = (s: Session) => ({ userId: s.user.id, role: s.role });

describe('the page to return to after signing in', () => {
  const owner = session('u-owner', 'owner');

  it('returns the same person in the same role to the page their session ended on', () => {
    expect(pathAfterSignIn(returnToState('/runs/r1?view=code', who(owner)), owner)).toBe('/runs/r1?view=code');
  });

  it('sends another person, or the same person in another role, to the start', () => {
    expect(pathAfterSignIn(returnToState('/runs/r1', who(owner)), session('u-operator', 'operator'))).toBe('/');
    expect(pathAfterSignIn(returnToState('/runs/r1', who(owner)), session('u-owner', 'viewer'))).toBe('/');
  });

  it('lets whoever signs in follow a link opened signed out', () => {
    expect(pathAfterSignIn(returnToState('/usage', null), session('u-viewer', 'viewer'))).toBe('/usage');
  });

  it('goes to the start without a page, or with anything that is not a path of the console', () => {
    expect(pathAfterSignIn(null, owner)).toBe('/');
    expect(pathAfterSignIn({ returnTo: { path: 'https://elsewhere.example/', userId: null, role: null } }, owner)).toBe('/');
    expect(pathAfterSignIn({ returnTo: { path: '//elsewhere.example/', userId: null, role: null } }, owner)).toBe('/');
  });
});
