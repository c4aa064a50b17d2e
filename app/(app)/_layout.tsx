import { Redirect, Stack } from 'expo-router';
import { useMeQuery } from '@/api/queries/session';
import { CurrentCollectionProvider } from '@/features/collections/current-collection';
import { FullScreenMessage } from '@/features/navigation/full-screen-message';
import { QueryState } from '@/components/query-state';

export default function SignedInLayout() {
  const me = useMeQuery();
  if (me.isPending) return <FullScreenMessage loading message="Checking your session…" />;
  if (me.data === null) return <Redirect href="/sign-in" />;
  return (
    <QueryState query={me}>
      {(data) => (
        <CurrentCollectionProvider collections={data!.collections}>
          <Stack screenOptions={{ headerShown: false }} />
        </CurrentCollectionProvider>
      )}
    </QueryState>
  );
}
