import { describe, expect, it } from 'vitest';
import { pageRouter, type RoutesManifest } from '../../../server/web/expo-routes';

// Patterns as Expo Router's server output writes them in server/_expo/routes.json (SDK 56).
const MANIFEST: RoutesManifest = {
  htmlRoutes: [
    { file: './(app)/(tabs)/plants/new.tsx', namedRegex: '^(?:/\\(app\\))?(?:/\\(tabs\\))?/plants/new(?:/)?$', routeKeys: {}, assets: { js: ['/new.js'] } },
    { file: './(app)/(tabs)/index.tsx', namedRegex: '^(?:/\\(app\\))?(?:/\\(tabs\\))?(?:/)?$', routeKeys: {}, assets: { js: ['/layout.js', '/index.js'], css: [] } },
    {
      file: './(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx',
      namedRegex: '^(?:/\\(app\\))?(?:/\\(tabs\\))?/plants/(?<plantId>[^/]+?)/leads/(?<leadId>[^/]+?)(?:/)?$',
      routeKeys: { plantId: 'plantId', leadId: 'leadId' },
      assets: { js: ['/layout.js', '/lead.js'] },
    },
    { file: './(app)/(tabs)/plants/[plantId]/index.tsx', namedRegex: '^(?:/\\(app\\))?(?:/\\(tabs\\))?/plants/(?<plantId>[^/]+?)(?:/)?$', routeKeys: { plantId: 'plantId' } },
  ],
  notFoundRoutes: [{ file: './+not-found.tsx', namedRegex: '^(?:/(?<notfound>.+?))?(?:/)?$', routeKeys: { notfound: 'not-found' } }],
  assets: { js: ['/runtime.js', '/entry.js'], css: [], favicon: '/favicon.ico' },
};

describe('pageRouter', () => {
  const route = pageRouter(MANIFEST);

  it("names the screen, its decoded parameters and every script it loads, the build's own first", () => {
    expect(route('/plants/p%201/leads/l2')).toEqual({
      file: '(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx',
      params: { plantId: 'p 1', leadId: 'l2' },
      assets: { js: ['/runtime.js', '/entry.js', '/layout.js', '/lead.js'], css: [] },
    });
    expect(route('/')?.file).toBe('(app)/(tabs)/index.tsx');
  });

  it("keeps the manifest's order, so a fixed segment wins over a parameter", () => {
    expect(route('/plants/new')?.file).toBe('(app)/(tabs)/plants/new.tsx');
    expect(route('/plants/abc')).toMatchObject({ file: '(app)/(tabs)/plants/[plantId]/index.tsx', params: { plantId: 'abc' } });
  });

  it('falls back to the not-found screen, and gives nothing for a path that cannot be decoded', () => {
    expect(route('/no/such/page')).toMatchObject({ file: '+not-found.tsx', params: { 'not-found': 'no/such/page' } });
    expect(route('/plants/%E0%A4%A/leads/x')).toBeNull();
  });
});
