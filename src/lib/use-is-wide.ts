import { useEffect, useSyncExternalStore } from 'react';
import { Dimensions } from 'react-native';
import { wideFromPage } from '@/api/page-data';
import { WIDE_LAYOUT_COOKIE } from '@/shared/boot';
import { rememberInCookie } from './cookie';
import { WIDE_BREAKPOINT } from '@/theme';

function subscribe(onChange: () => void): () => void {
  const subscription = Dimensions.addEventListener('change', onChange);
  return () => subscription.remove();
}

const isWideNow = () => Dimensions.get('window').width >= WIDE_BREAKPOINT;
/**
 * The server cannot measure the window: it draws the layout this browser last had (a cookie),
 * else the phone's (phone first), and the browser's first draw over the page does the same.
 */
const onServer = () => wideFromPage() ?? false;

let remembered: boolean | undefined;

/** Keeps the layout in a cookie, so the server draws the next page in it. */
function rememberLayout(wide: boolean): void {
  if (remembered === wide) return;
  remembered = wide;
  rememberInCookie(WIDE_LAYOUT_COOKIE, wide ? '1' : '0');
}

/** True from the width where the tabs become a side rail and screens use two columns. */
export function useIsWide(): boolean {
  const wide = useSyncExternalStore(subscribe, isWideNow, onServer);
  useEffect(() => rememberLayout(wide), [wide]);
  return wide;
}
