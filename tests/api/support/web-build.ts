import fs from 'node:fs/promises';
import path from 'node:path';

export const CHUNKS = '/_expo/static/js/web';

/**
 * A stand-in for the render module of Expo Router's server output (the real one is drawn by
 * the browser tests in e2e/): it waits a moment, as a real render may, then writes the page
 * data the app would read, and the page's scripts as the real module does.
 */
const RENDER_MODULE = `
exports.getStaticContent = async function (url, options) {
  await new Promise(function (resolve) { setTimeout(resolve, 5); });
  var seen = JSON.stringify(globalThis.__sympodiaPageData === undefined ? null : globalThis.__sympodiaPageData);
  var scripts = options.assets.js.map(function (src) { return '<script src="' + src + '" defer></script>'; }).join('');
  return '<!DOCTYPE html><html lang="en"><head><title data-rh="true"></title><title>Sympodia</title></head><body>' +
    '<div id="root" data-path="' + url.pathname + '"></div><textarea id="seen">' + seen.replace(/</g, '&lt;') + '</textarea>' + scripts + '</body></html>';
};
`;

export const ROUTES = {
  htmlRoutes: [
    { file: './(app)/(tabs)/index.tsx', namedRegex: '^(?:/\\(app\\))?(?:/\\(tabs\\))?(?:/)?$', routeKeys: {}, assets: { css: [], js: [`${CHUNKS}/_layout-1.js`, `${CHUNKS}/index-3.js`] } },
    {
      file: './(app)/(tabs)/plants/[plantId]/leads/[leadId].tsx',
      namedRegex: '^(?:/\\(app\\))?(?:/\\(tabs\\))?/plants/(?<plantId>[^/]+?)/leads/(?<leadId>[^/]+?)(?:/)?$',
      routeKeys: { plantId: 'plantId', leadId: 'leadId' },
      assets: { css: [], js: [`${CHUNKS}/_layout-1.js`, `${CHUNKS}/[leadId]-4.js`] },
    },
    { file: './(auth)/sign-in.tsx', namedRegex: '^(?:/\\(auth\\))?/sign\\-in(?:/)?$', routeKeys: {}, assets: { css: [], js: [`${CHUNKS}/sign-in-5.js`] } },
  ],
  notFoundRoutes: [{ file: './+not-found.tsx', namedRegex: '^(?:/(?<notfound>.+?))?(?:/)?$', routeKeys: { notfound: 'not-found' }, assets: { css: [], js: [] } }],
  assets: { css: [], js: [`${CHUNKS}/__expo-metro-runtime-0.js`, `${CHUNKS}/entry-abc123.js`], favicon: '/favicon.ico' },
};

/**
 * Writes, under `webRoot`, the server half of an exported build as the page server reads it
 * (server/_expo/routes.json and the stand-in render module) and an empty client/ folder.
 */
export async function writeStandInBuild(webRoot: string): Promise<void> {
  const serverRoot = path.join(webRoot, 'server', '_expo');
  await fs.mkdir(path.join(serverRoot, 'server'), { recursive: true });
  await fs.mkdir(path.join(webRoot, 'client'), { recursive: true });
  await fs.writeFile(path.join(serverRoot, 'routes.json'), JSON.stringify(ROUTES));
  await fs.writeFile(path.join(serverRoot, 'server', 'render.js'), RENDER_MODULE);
}
