import { EmptyState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { formatLongDate } from '@/lib/format';
import { useCurrentCollection } from '../collections/current-collection';

export function TodayScreen() {
  const { collection } = useCurrentCollection();
  return (
    <Screen title="Today" subtitle={`${formatLongDate(new Date())}${collection ? ` · ${collection.name}` : ''}`} testID="today-screen">
      <EmptyState
        title="Nothing needs a look today"
        body="Leads due for measuring, stalled growths, sheaths to check and bloom windows opening soon will gather here once your plants have leads and measurements."
      />
    </Screen>
  );
}
