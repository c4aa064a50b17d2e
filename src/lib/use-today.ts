import { useSyncExternalStore } from 'react';
import { todayFromPage } from '@/api/page-data';
import { localToday } from './dates';

const MINUTE_MS = 60_000;

/** Asks again every minute, so a screen left open past midnight moves on to the new day. */
function subscribe(onChange: () => void): () => void {
  const timer = setInterval(onChange, MINUTE_MS);
  return () => clearInterval(timer);
}

/**
 * Today's local date (`YYYY-MM-DD`) for drawing a screen. The server draws the page on its own
 * date, and the browser's first draw over that page must say the same; right after it, the
 * screen moves to the grower's own date if that is another.
 */
export function useToday(): string {
  return useSyncExternalStore(subscribe, localToday, () => todayFromPage() ?? localToday());
}
