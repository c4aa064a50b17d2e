import { useSyncExternalStore } from 'react';
import { Dimensions } from 'react-native';
import { WIDE_BREAKPOINT } from '@/theme';

function subscribe(onChange: () => void): () => void {
  const subscription = Dimensions.addEventListener('change', onChange);
  return () => subscription.remove();
}

const isWideNow = () => Dimensions.get('window').width >= WIDE_BREAKPOINT;
/** The server cannot know the width: it draws the phone layout (phone first), and so does the browser's first draw over it. */
const onServer = () => false;

/** True from the width where the tabs become a side rail and screens use two columns. */
export function useIsWide(): boolean {
  return useSyncExternalStore(subscribe, isWideNow, onServer);
}
