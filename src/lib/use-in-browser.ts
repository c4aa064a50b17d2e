import { useSyncExternalStore } from 'react';

const noSubscription = () => () => {};

/**
 * False while the server draws a page and while the browser takes that page over (hydration),
 * true after. For parts that only a browser can draw (the chart engine): the server's page and
 * the browser's first draw over it then agree, and the part follows at once.
 */
export function useInBrowser(): boolean {
  return useSyncExternalStore(noSubscription, () => true, () => false);
}
