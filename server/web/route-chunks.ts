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
    const segments = parts
      .filter((part, i) => !GROUP.test(part) && !(i === parts.length - 1 && part === 'index'))
      .map((part) => (CATCH_ALL.test(part) ? '*' : DYNAMIC.test(part) ? null : part));
    screens.push({ file, segments, rank: segments.filter((s) => s !== null && s !== '*').length });
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

/** A function from a request path to the chunk URLs its page loads before it can draw. */
export function routeChunks(manifest: RouteChunkManifest): (urlPath: string) => string[] {
  const screens = screensOf(manifest);
  const notFound = Object.keys(manifest).find((file) => /(^|\/)\+not-found\.[jt]sx?$/.test(file));
  return (urlPath) => {
    let path: string[];
    try {
      path = urlPath.split('/').filter(Boolean).map(decodeURIComponent);
    } catch {
      return [];
    }
    const screen = screens.find((s) => matches(s, path));
    if (screen) return withLayouts(manifest, screen.file);
    return notFound ? withLayouts(manifest, notFound) : [];
  };
}
