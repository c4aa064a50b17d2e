import fs from 'node:fs';
import path from 'node:path';

/**
 * The routes of the exported app as Expo Router's server output lists them
 * (`server/_expo/routes.json`): each screen's path pattern and the script chunks its page
 * loads (layouts first), plus the chunks every page loads.
 */
interface RouteEntry {
  file: string;
  namedRegex: string;
  routeKeys: Record<string, string>;
  assets?: { js?: string[]; css?: string[] };
}

export interface RoutesManifest {
  htmlRoutes: RouteEntry[];
  notFoundRoutes: RouteEntry[];
  assets: { js: string[]; css: string[]; favicon?: string };
}

export interface PageRoute {
  /** The route file relative to app/, e.g. "(app)/(tabs)/index.tsx". */
  file: string;
  /** Its dynamic segments' values by name, decoded. */
  params: Record<string, string>;
  /** Every script and style sheet the page loads, in order. */
  assets: { js: string[]; css: string[] };
}

export function readRoutesManifest(serverRoot: string): RoutesManifest {
  return JSON.parse(fs.readFileSync(path.join(serverRoot, '_expo', 'routes.json'), 'utf8')) as RoutesManifest;
}

/**
 * A function from a request path to the screen Expo Router shows for it (its not-found screen
 * when none matches), in the manifest's own order and by its own patterns. `null` when the path
 * cannot be decoded.
 */
export function pageRouter(manifest: RoutesManifest): (urlPath: string) => PageRoute | null {
  const compiled = [...manifest.htmlRoutes, ...manifest.notFoundRoutes].map((route) => ({ route, pattern: new RegExp(route.namedRegex) }));
  return (urlPath) => {
    for (const { route, pattern } of compiled) {
      const match = pattern.exec(urlPath);
      if (!match) continue;
      const params: Record<string, string> = {};
      try {
        for (const [group, name] of Object.entries(route.routeKeys)) {
          const value = match.groups?.[group];
          if (value !== undefined) params[name] = decodeURIComponent(value);
        }
      } catch {
        return null;
      }
      return {
        file: route.file.replace(/^\.\//, ''),
        params,
        assets: {
          js: [...manifest.assets.js, ...(route.assets?.js ?? [])],
          css: [...manifest.assets.css, ...(route.assets?.css ?? [])],
        },
      };
    }
    return null;
  };
}
