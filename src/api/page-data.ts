import type { z } from 'zod';
import { BOOT_ELEMENT_ID, PAGE_DATA_GLOBAL } from '@/shared/boot';
import { pageDataSchema, type Me, type PageData } from '@/shared/schemas/auth';
import { request } from './client';

/**
 * What the page was served with (see server/web/serve-build.ts): who is signed in, the
 * collection its screens open and the first screen's first API answers. The server draws the
 * page from these and writes them into it, so the browser's first draw is the same page and no
 * request is made twice. On the server they are handed over in a global for the one render in
 * progress; in the browser they are read once from the page's JSON element.
 */
let fromPage: PageData | null | undefined;

/** The server's handed-over data and its parsed form, so one render parses it once. */
let handedOver: { from: unknown; data: PageData | null } | undefined;

function pageData(): PageData | null {
  const handed = (globalThis as Record<string, unknown>)[PAGE_DATA_GLOBAL];
  if (handed !== undefined) {
    if (handedOver?.from !== handed) {
      const parsed = pageDataSchema.safeParse(handed);
      handedOver = { from: handed, data: parsed.success ? parsed.data : null };
    }
    return handedOver.data;
  }
  if (fromPage !== undefined) return fromPage;
  fromPage = null;
  if (typeof document === 'undefined') return null;
  const element = document.getElementById(BOOT_ELEMENT_ID);
  if (!element) return null;
  element.remove();
  try {
    const parsed = pageDataSchema.safeParse(JSON.parse(element.textContent ?? ''));
    if (parsed.success) fromPage = parsed.data;
  } catch {
    // An unreadable element: the screens ask the server themselves.
  }
  return fromPage;
}

/** Who the page was served to; `undefined` when it does not say (the session query then asks). */
export function meFromPage(): Me | null | undefined {
  return pageData()?.me;
}

/**
 * The collection the server drew the page's screens in, if it drew any. In the browser it is
 * taken once, by the first draw: a later one (after signing in again, say) opens the
 * browser's own choice.
 */
export function collectionFromPage(): string | undefined {
  const data = pageData();
  const id = data?.collectionId;
  if (data && data === fromPage) delete data.collectionId;
  return id;
}

/** The date the server drew the page on: what the browser's first draw must show as today. */
export function todayFromPage(): string | undefined {
  return pageData()?.today;
}

/** Whether the server drew the page in the wide layout; `undefined` when it did not say. */
export function wideFromPage(): boolean | undefined {
  return pageData()?.wide;
}

/** When the server asked for the page's answers (ms since 1970), for their queries' age. */
export function answeredAtFromPage(): number | undefined {
  return pageData()?.answeredAt;
}

/**
 * The page's answer for `path` (as passed to `request`), parsed with the query's own schema,
 * and forgotten in the browser once taken: a later visit to the screen asks the server, so an
 * answer as old as the page is never shown as fresh.
 */
export function responseFromPage<S extends z.ZodType>(path: string, schema: S): z.infer<S> | undefined {
  const data = pageData();
  const responses = data?.responses;
  const body = responses?.[path];
  if (!responses || body === undefined) return undefined;
  if (data === fromPage) delete responses[path];
  const parsed = schema.safeParse(body);
  return parsed.success ? parsed.data : undefined;
}

/**
 * Drops the page's answers no screen has taken yet: after a write, or when someone else signs
 * in, they no longer describe the records.
 */
export function forgetPageAnswers(): void {
  if (fromPage) delete fromPage.responses;
}

/**
 * A first screen's query options for `path` (as passed to `request`): asked of the server, but
 * started from the page's answer when it carries one, aged from when the server asked.
 */
export function fromPageOrServer<S extends z.ZodType>(path: string, schema: S) {
  return {
    queryFn: () => request(path, { schema }) as Promise<z.infer<S>>,
    initialData: () => responseFromPage(path, schema),
    initialDataUpdatedAt: answeredAtFromPage,
  };
}
