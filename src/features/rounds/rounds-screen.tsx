import { EmptyState } from '@/components/query-state';
import { Screen } from '@/components/screen';

export function RoundsScreen() {
  return (
    <Screen title="Rounds" subtitle="The measuring walk" testID="rounds-screen">
      <EmptyState
        title="No plants to walk yet"
        body="Once the collection has plants, Rounds takes you through them one at a time in the order you walk your benches, with last time's values ready to change."
      />
    </Screen>
  );
}
