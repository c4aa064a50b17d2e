import fs from 'node:fs';
import path from 'node:path';
import type { Express, Request, Response } from 'express';
import expressStaticGzip from 'express-static-gzip';
import type { Logger } from 'pino';
import type { Me } from '@/shared/schemas/auth';
import { BOOT_ELEMENT_ID, CURRENT_COLLECTION_COOKIE } from '@/shared/boot';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { readSession } from '../middleware/session';
import { describeMe } from '../services/me';
import { firstRequests } from './data-preloads';
import { routeChunks, routeMatcher, type RouteChunkManifest } from './route-chunks';

/** A value for a double-quoted HTML attribute. */
function attribute(value: string): string {
  return value.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
}

/** `<`, U+2028 and U+2029 written as escapes, so the JSON cannot end its script element early. */
function jsonForScript(value: unknown): string {
  return JSON.stringify(value).replace(/</g, '\\u003c').replace(/\u2028/g, '\\u2028').replace(/\u2029/g, '\\u2029');
}

/** The app's own font files (the WOFF2 subsets under assets/), as URL paths. */
function fontFiles(webRoot: string): string[] {
  const found: string[] = [];
  const walk = (dir: string) => {
    for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
      const file = path.join(dir, entry.name);
      if (entry.isDirectory()) walk(file);
      else if (entry.name.endsWith('.woff2')) found.push(`/${path.relative(webRoot, file).split(path.sep).join('/')}`);
    }
  };
  const assets = path.join(webRoot, 'assets');
  if (fs.existsSync(assets)) walk(assets);
  return found.sort();
}

function readManifest(webRoot: string): RouteChunkManifest {
  const file = path.join(webRoot, 'route-chunks.json');
  if (!fs.existsSync(file)) return {};
  return JSON.parse(fs.readFileSync(file, 'utf8')) as RouteChunkManifest;
}

/**
 * Serves the exported single-page app: real files first (Brotli or gzip files written at build
 * time when the browser takes them), then index.html for any route. The page names the chunks
 * its route loads as preloads, and carries who is signed in, so the first screen does not wait
 * for a session request after the bundle has run.
 */
export function serveWebBuild(app: Express, webRoot: string, ctx: Pick<AppContext, 'db' | 'auth' | 'validateSession'>, logger: Logger): void {
  const indexFile = path.join(webRoot, 'index.html');
  if (!fs.existsSync(indexFile)) throw new Error(`No web build at ${webRoot}; run npm run build:web`);
  const template = fs.readFileSync(indexFile, 'utf8');
  const manifest = readManifest(webRoot);
  const chunksFor = routeChunks(manifest);
  const routeOf = routeMatcher(manifest);
  // Fonts are asked for only once the bundle has run and drawn text; named here they arrive
  // alongside it, so the first screen is drawn in Source Sans 3 rather than swapped into it.
  const fontPreloads = fontFiles(webRoot)
    .map((href) => `<link rel="preload" as="font" type="font/woff2" crossorigin fetchpriority="low" href="${attribute(href)}">`)
    .join('');

  app.use(
    expressStaticGzip(webRoot, {
      index: false,
      enableBrotli: true,
      orderPreference: ['br', 'gzip'],
      serveStatic: {
        index: false,
        setHeaders: (res, file) => {
          // Hashed bundles never change; everything else is revalidated.
          if (file.includes(`${path.sep}_expo${path.sep}`) || file.includes(`${path.sep}assets${path.sep}`)) {
            res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
          }
        },
      },
    }),
  );

  /** Who is signed in: `null` for nobody, `undefined` when it cannot be told now (the page then asks itself). */
  async function signedIn(req: Request, res: Response): Promise<Me | null | undefined> {
    try {
      const found = await readSession(ctx.auth, ctx.validateSession, req, res, null);
      return found ? await describeMe(ctx.db, found.user) : null;
    } catch (error) {
      logger.warn({ err: error }, 'page served without the session: it could not be read');
      return undefined;
    }
  }

  /** The collection the page's screens will open: the browser's remembered one, else the first (as the app chooses). */
  function currentCollection(req: Request, me: Me): string | undefined {
    const remembered = new RegExp(`(?:^|;\\s*)${CURRENT_COLLECTION_COOKIE}=([^;]*)`).exec(req.headers.cookie ?? '')?.[1];
    return me.collections.find((c) => c.id === remembered)?.id ?? me.collections[0]?.id;
  }

  app.get('/{*splat}', async (req, res, next) => {
    // A missing file (a name with an extension) is a 404, not the app's page in its place.
    if (/\.[a-z0-9]+$/i.test(req.path)) return next(new HttpError(404, 'not_found', `No file ${req.path}`));
    const me = await signedIn(req, res);
    const collectionId = me ? currentCollection(req, me) : undefined;
    const head = [
      fontPreloads,
      // Low, as the deferred bundle they follow is: the bundle runs first, so they must not take its bandwidth.
      // The href exactly as the router's loader will ask for it (brackets and all), or the browser
      // would not match the two and would fetch the chunk twice.
      ...chunksFor(req.path).map((href) => `<link rel="preload" as="script" fetchpriority="low" href="${attribute(href)}">`),
      // Same mode and credentials as the app's fetch, so the browser hands it the preloaded answer.
      ...(collectionId ? firstRequests(routeOf(req.path), collectionId) : []).map(
        (href) => `<link rel="preload" as="fetch" crossorigin="use-credentials" href="${attribute(href)}">`,
      ),
      me === undefined ? '' : `<script type="application/json" id="${BOOT_ELEMENT_ID}">${jsonForScript({ me })}</script>`,
    ].join('');
    // The page now carries the person's name and collections: never shared, never stored.
    res.set('Cache-Control', 'private, no-store');
    res.set('Vary', 'Cookie');
    // A function as the replacement, so a `$&` or `$'` in someone's name is not read as a pattern.
    res.type('html').send(template.includes('</head>') ? template.replace('</head>', () => `${head}</head>`) : head + template);
  });
}
