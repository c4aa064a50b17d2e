import { EmptyState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { useCurrentCollection } from '../collections/current-collection';

export function PlantsScreen() {
  const { collection } = useCurrentCollection();
  return (
    <Screen title="Plants" subtitle={collection?.name} testID="plants-screen">
      <EmptyState
        title="No plants yet — add your first plant"
        body="Each plant keeps its tag, its name, where it grows and its medium, and every lead it makes season after season."
      />
    </Screen>
  );
}
