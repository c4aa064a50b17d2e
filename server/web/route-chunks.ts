/**
 * Which script chunks a page of the exported app needs, from the build's route-chunks.json
 * (route file → chunk, written by scripts/web/postbuild.mjs). Expo Router loads a page's
 * layouts and screen as separate chunks only once the bundle has run; naming them in the
 * page as preloads lets the browser fetch them alongside the bundle instead of after it.
 */

/** Route file (relative to app/, e.g. "(app)/(tabs)/plants/[plantId]/index.tsx") → chunk URL. */
export type RouteChunkManifest = Record<string, string>;

interface Screen {
  file: string;
  /** URL segments: a literal, `null` for one dynamic segment, `'*'` for a catch-all. */
  segments: Array<string | null>;
  /** The parameter name of each dynamic segment (undefined for literals). */
  names: Array<string | undefined>;
  /** More literal segments rank first, as Expo Router prefers /plants/new over /plants/[plantId]. */
  rank: number;
}

const GROUP = /^\(.+\)$/;
const DYNAMIC = /^\[[^.\]]+\]$/;
const CATCH_ALL = /^\[\.\.\..+\]$/;

function screensOf(manifest: RouteChunkManifest): Screen[] {
  const screens: Screen[] = [];
  for (const file of Object.keys(manifest)) {
    const parts = file.replace(/\.[jt]sx?$/, '').split('/');
    const name = parts.at(-1)!;
    if (name === '_layout' || name.startsWith('+')) continue;
    const kept = parts.filter((part, i) => !GROUP.test(part) && !(i === parts.length - 1 && part === 'index'));
    const segments = kept.map((part) => (CATCH_ALL.test(part) ? '*' : DYNAMIC.test(part) ? null : part));
    const names = kept.map((part) => (CATCH_ALL.test(part) || DYNAMIC.test(part) ? part.replace(/^\[(\.\.\.)?|\]$/g, '') : undefined));
    screens.push({ file, segments, names, rank: segments.filter((s) => s !== null && s !== '*').length });
  }
  return screens.sort((a, b) => b.rank - a.rank || b.segments.length - a.segments.length);
}

function matches(screen: Screen, path: string[]): boolean {
  for (let i = 0; i < screen.segments.length; i++) {
    const segment = screen.segments[i];
    if (segment === '*') return path.length > i;
    if (i >= path.length) return false;
    if (segment !== null && segment !== path[i]) return false;
  }
  return screen.segments.length === path.length;
}

/** The layouts from the root down to `file`'s folder that the manifest holds, then `file`. */
function withLayouts(manifest: RouteChunkManifest, file: string): string[] {
  const folders = file.split('/').slice(0, -1);
  const chunks: string[] = [];
  for (let depth = 0; depth <= folders.length; depth++) {
    const layout = [...folders.slice(0, depth), '_layout.tsx'].join('/');
    if (manifest[layout]) chunks.push(manifest[layout]);
  }
  chunks.push(manifest[file]);
  return chunks;
}

/** The path's segments, decoded; `null` when one cannot be decoded. */
function decodePath(urlPath: string): string[] | null {
  try {
    return urlPath.split('/').filter(Boolean).map(decodeURIComponent);
  } catch {
    return null;
  }
}

export interface RouteMatch {
  /** The route file, as the manifest names it. */
  file: string;
  /** Its dynamic segments' values by name (a catch-all's joined with '/'). */
  params: Record<string, string>;
}

/** A function from a request path to the route file Expo Router would show for it, if any. */
export function routeMatcher(manifest: RouteChunkManifest): (urlPath: string) => RouteMatch | null {
  const screens = screensOf(manifest);
  return (urlPath) => {
    const path = decodePath(urlPath);
    if (!path) return null;
    const screen = screens.find((s) => matches(s, path));
    if (!screen) return null;
    const params: Record<string, string> = {};
    screen.segments.forEach((segment, i) => {
      const name = screen.names[i];
      if (name) params[name] = segment === '*' ? path.slice(i).join('/') : path[i];
    });
    return { file: screen.file, params };
  };
}

/** A function from a request path to the chunk URLs its page loads before it can draw. */
export function routeChunks(manifest: RouteChunkManifest): (urlPath: string) => string[] {
  const match = routeMatcher(manifest);
  const notFound = Object.keys(manifest).find((file) => /(^|\/)\+not-found\.[jt]sx?$/.test(file));
  return (urlPath) => {
    if (!decodePath(urlPath)) return [];
    const found = match(urlPath);
    if (found) return withLayouts(manifest, found.file);
    return notFound ? withLayouts(manifest, notFound) : [];
  };
}
