import { describe, expect, it } from 'vitest';
import { routeChunks, routeMatcher } from '../../../server/web/route-chunks';

// The app/ folder's route files as scripts/web/postbuild.mjs writes them (chunk names shortened).
const manifest = {
  '_layout.tsx': '/c/root-layout.js',
  '+not-found.tsx': '/c/not-found.js',
  '(auth)/_layout.tsx': '/c/auth-layout.js',
  '(auth)/sign-in.tsx': '/c/sign-in.js',
  '(app)/_layout.tsx': '/c/app-layout.js',
  '(app)/import.tsx': '/c/import.js',
  '(app)/(tabs)/_layout.tsx': '/c/tabs-layout.js',
  '(app)/(tabs)/index.tsx': '/c/today.js',
  '(app)/(tabs)/calendar.tsx': '/c/calendar.js',
  '(app)/(tabs)/plants/_layout.tsx': '/c/plants-layout.js',
  '(app)/(tabs)/plants/index.tsx': '/c/plants.js',
  '(app)/(tabs)/plants/new.tsx': '/c/new-plant.js',
  '(app)/(tabs)/plants/[plantId]/index.tsx': '/c/plant.js',
  '(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx': '/c/lead.js',
  'invite/[token].tsx': '/c/invite.js',
  'docs/[...rest].tsx': '/c/docs.js',
};
const chunksFor = routeChunks(manifest);

describe('routeChunks', () => {
  it('gives Today its layouts from the root down, then its screen', () => {
    expect(chunksFor('/')).toEqual(['/c/root-layout.js', '/c/app-layout.js', '/c/tabs-layout.js', '/c/today.js']);
  });

  it('matches dynamic segments and keeps every layout on the way', () => {
    expect(chunksFor('/plants/p-1/leads/l-9')).toEqual([
      '/c/root-layout.js',
      '/c/app-layout.js',
      '/c/tabs-layout.js',
      '/c/plants-layout.js',
      '/c/lead.js',
    ]);
    expect(chunksFor('/invite/abc')).toEqual(['/c/root-layout.js', '/c/invite.js']);
  });

  it('prefers a literal segment over a dynamic one, as the router does', () => {
    expect(chunksFor('/plants/new').at(-1)).toBe('/c/new-plant.js');
    expect(chunksFor('/plants/new-one').at(-1)).toBe('/c/plant.js');
  });

  it('reads a trailing slash and an escaped segment as the same page', () => {
    expect(chunksFor('/calendar/').at(-1)).toBe('/c/calendar.js');
    expect(chunksFor('/plants/a%20b').at(-1)).toBe('/c/plant.js');
  });

  it('lets a catch-all take one or more segments but not none', () => {
    expect(chunksFor('/docs/a/b/c').at(-1)).toBe('/c/docs.js');
    expect(chunksFor('/docs').at(-1)).toBe('/c/not-found.js');
  });

  it('sends an unknown path or an undecodable one to the not-found page or nothing', () => {
    expect(chunksFor('/plants/p-1/extra/deep')).toEqual(['/c/root-layout.js', '/c/not-found.js']);
    expect(chunksFor('/plants/%E0%A4%A')).toEqual([]);
    expect(routeChunks({})('/')).toEqual([]);
  });
});

describe('routeMatcher', () => {
  const match = routeMatcher(manifest);

  it("names the route file and its dynamic segments' values", () => {
    expect(match('/plants/p-1/leads/l-9')).toEqual({ file: '(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx', params: { plantId: 'p-1', leadId: 'l-9' } });
    expect(match('/')).toEqual({ file: '(app)/(tabs)/index.tsx', params: {} });
    expect(match('/docs/a/b')).toEqual({ file: 'docs/[...rest].tsx', params: { rest: 'a/b' } });
    expect(match('/plants/a%20b')?.params).toEqual({ plantId: 'a b' });
  });

  it('matches nothing for an unknown or undecodable path', () => {
    expect(match('/nowhere/at/all')).toBeNull();
    expect(match('/plants/%E0%A4%A')).toBeNull();
  });
});
