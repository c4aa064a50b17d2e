import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { Express, Request, Response } from 'express';
import expressStaticGzip from 'express-static-gzip';
import type { Logger } from 'pino';
import type { Me, PageData } from '@/shared/schemas/auth';
import { localToday } from '@/lib/dates';
import { BOOT_ELEMENT_ID, CURRENT_COLLECTION_COOKIE, PAGE_DATA_GLOBAL, WIDE_LAYOUT_COOKIE } from '@/shared/boot';
import type { AppContext } from '../context';
import { HttpError } from '../errors';
import { readSession } from '../middleware/session';
import { describeMe } from '../services/me';
import { pageRouter, readRoutesManifest, type PageRoute } from './expo-routes';
import { firstRequests } from './first-responses';

/**
 * How long the page waits for one of its screen's first answers before leaving it to the
 * browser. Short: every answer holds back the whole page (cold nights wait on the forecast service).
 */
const FIRST_RESPONSE_TIMEOUT_MS = 1_500;

/** `<`, U+2028 and U+2029 written as escapes, so the JSON cannot end its script element early. */
function jsonForScript(value: unknown): string {
  return JSON.stringify(value).replace(/</g, '\\u003c').replace(/\u2028/g, '\\u2028').replace(/\u2029/g, '\\u2029');
}

/** A cookie's raw value in the request, if it has one. */
function cookie(req: Request, name: string): string | undefined {
  return new RegExp(`(?:^|;\\s*)${name}=([^;]*)`).exec(req.headers.cookie ?? '')?.[1];
}

/** The render module of Expo Router's server output (`server/_expo/server/render.js`). */
interface RenderModule {
  /** The whole page in one string (React's renderToString), with the page's scripts deferred at its end. */
  getStaticContent(location: URL, options: { assets: PageRoute['assets'] }): Promise<string>;
}

/**
 * Tells the router's client entry to take over the page drawn here (React's hydrateRoot)
 * rather than draw it again; Expo's streaming renderer writes the same line.
 */
const HYDRATE_SCRIPT = '<script>globalThis.__EXPO_ROUTER_HYDRATE__=true;</script>';

/**
 * The page's scripts, asked for only after the browser has painted the page: requested with
 * the page, they would share the link with the fonts and make a slow phone's first paint wait
 * for them. Written in order with `async = false`, so they run in that order, as deferred
 * scripts would. A page opened in a background tab, which paints nothing, asks at once.
 */
function scriptsAfterPaint(sources: string[]): string {
  const list = jsonForScript(sources);
  return (
    `<script>(function(){var s=${list},d=false;function load(){if(d)return;d=true;` +
    `s.forEach(function(src){var e=document.createElement('script');e.src=src;e.async=false;document.body.appendChild(e);});}` +
    `if(document.visibilityState==='hidden')load();else requestAnimationFrame(function(){setTimeout(load,0);});})();</script>`
  );
}

/** The deferred script elements the render module writes at the end of the body. */
const DEFERRED_SCRIPT = /<script src="([^"]+)" defer><\/script>\s*/g;

/**
 * Draws pages one at a time: the render module keeps the fonts and styles of the page in
 * progress in globals, and the page's data is handed to the app in one too. The page is drawn
 * whole, in one piece (not streamed): a streamed page large enough to come in parts is put
 * together by an inline script, so the browser could show nothing before it ran.
 */
function pageRenderer(render: RenderModule) {
  let queue: Promise<unknown> = Promise.resolve();
  return (url: URL, assets: PageRoute['assets'], data: PageData): Promise<string> => {
    const next = queue.then(async () => {
      const holder = globalThis as Record<string, unknown>;
      holder[PAGE_DATA_GLOBAL] = data;
      try {
        return await render.getStaticContent(url, { assets });
      } finally {
        delete holder[PAGE_DATA_GLOBAL];
      }
    });
    queue = next.catch(() => undefined);
    return next;
  };
}

/** The hashes of a page's inline scripts (the router's hydration flag), for its script-src. */
function inlineScriptHashes(html: string): string[] {
  const hashes = new Set<string>();
  for (const [, attributes, body] of html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/g)) {
    if (/\bsrc=/.test(attributes) || /type="application\/json"/.test(attributes)) continue;
    hashes.add(`'sha256-${crypto.createHash('sha256').update(body).digest('base64')}'`);
  }
  return [...hashes];
}

/** The Content-Security-Policy set for every response, with `hashes` added to its script-src. */
function allowScripts(res: Response, hashes: string[]): void {
  const policy = res.getHeader('Content-Security-Policy');
  if (typeof policy !== 'string' || hashes.length === 0) return;
  res.setHeader('Content-Security-Policy', policy.replace(/(^|;)(\s*script-src(?=[\s;]|$)[^;]*)/, (_m, start: string, directive: string) => `${start}${directive} ${hashes.join(' ')}`));
}

/**
 * Serves the app from Expo Router's server output: real files from `client/` first (Brotli or
 * gzip files written at build time when the browser takes them), then, for any route, the page
 * drawn on the server by the app's own screens. The page server reads who is signed in and the
 * screen's first API answers, draws the screen from them and writes them into the page, so the
 * browser shows the screen before any script has run and its scripts take over the same page.
 */
export function serveWebBuild(app: Express, webRoot: string, ctx: Pick<AppContext, 'db' | 'auth' | 'validateSession'>, logger: Logger): void {
  const clientRoot = path.join(webRoot, 'client');
  const serverRoot = path.join(webRoot, 'server');
  const renderFile = path.join(serverRoot, '_expo', 'server', 'render.js');
  if (!fs.existsSync(renderFile)) throw new Error(`No server-rendered web build at ${webRoot}; run npm run build:web`);
  const routeOf = pageRouter(readRoutesManifest(serverRoot));
  // eslint-disable-next-line @typescript-eslint/no-require-imports -- the build's own CommonJS module, found at run time
  const renderPage = pageRenderer(require(renderFile) as RenderModule);

  app.use(
    expressStaticGzip(clientRoot, {
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
    const remembered = cookie(req, CURRENT_COLLECTION_COOKIE);
    return me.collections.find((c) => c.id === remembered)?.id ?? me.collections[0]?.id;
  }

  /**
   * The screen's first API answers, asked of this same server over loopback with the visitor's
   * cookie, so they pass the same checks as the browser's own requests. One that fails or is
   * refused is left out: the screen asks for it and shows the refusal itself.
   */
  async function firstResponses(req: Request, paths: string[]): Promise<Record<string, unknown>> {
    const { localAddress, localPort } = req.socket;
    const host = !localAddress || localAddress === '::' || localAddress === '0.0.0.0' ? '127.0.0.1' : localAddress.replace(/^::ffff:/, '');
    const origin = `http://${host.includes(':') ? `[${host}]` : host}:${localPort}`;
    const answers = await Promise.all(
      paths.map(async (apiPath) => {
        try {
          const answer = await fetch(`${origin}/api${apiPath}`, {
            headers: { cookie: req.headers.cookie ?? '' },
            signal: AbortSignal.timeout(FIRST_RESPONSE_TIMEOUT_MS),
          });
          if (answer.ok) return [apiPath, await answer.json()] as const;
          await answer.body?.cancel();
          return null;
        } catch (error) {
          logger.warn({ err: error, path: apiPath }, "page drawn without one of its screen's first answers");
          return null;
        }
      }),
    );
    return Object.fromEntries(answers.filter((answer) => answer !== null));
  }

  app.get('/{*splat}', async (req, res, next) => {
    // A missing file (a name with an extension) is a 404, not the app's page in its place.
    if (/\.[a-z0-9]+$/i.test(req.path)) return next(new HttpError(404, 'not_found', `No file ${req.path}`));
    const route = routeOf(req.path);
    if (!route) return next(new HttpError(400, 'bad_path', 'The address could not be read'));
    // The path as a path: `//host/x` in the request line must not become a host.
    const url = new URL('http://page.invalid');
    url.pathname = req.path;
    const query = req.originalUrl.indexOf('?');
    if (query >= 0) url.search = req.originalUrl.slice(query);
    const me = await signedIn(req, res);
    const collectionId = me ? currentCollection(req, me) : undefined;
    const answeredAt = Date.now();
    const data: PageData = {
      ...(me === undefined ? {} : { me }),
      ...(collectionId ? { collectionId, responses: await firstResponses(req, firstRequests(route, collectionId)), answeredAt } : {}),
      today: localToday(),
      ...(cookie(req, WIDE_LAYOUT_COOKIE) === '1' ? { wide: true } : {}),
    };
    const rendered = await renderPage(url, route.assets, data);
    const sources = [...rendered.matchAll(DEFERRED_SCRIPT)].map((m) => m[1]);
    const html = rendered.replace(DEFERRED_SCRIPT, '').replace('</body>', () => `${scriptsAfterPaint(sources)}</body>`);
    allowScripts(res, inlineScriptHashes(HYDRATE_SCRIPT + html));
    // The page now carries the person's name and records: never shared, never stored.
    res.set('Cache-Control', 'private, no-store');
    res.set('Vary', 'Cookie');
    const carried = `<script type="application/json" id="${BOOT_ELEMENT_ID}">${jsonForScript(data)}</script>${HYDRATE_SCRIPT}`;
    // The head manager's own title is empty (no screen sets one): the document's own stands.
    const page = html.replace('<title data-rh="true"></title>', '');
    // A function as the replacement, so a `$&` or `$'` in someone's name is not read as a pattern.
    res.type('html').send(page.replace('</head>', () => `${carried}</head>`));
  });
}
