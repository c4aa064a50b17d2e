import { EmptyState } from '@/components/query-state';
import { Screen } from '@/components/screen';

export function CalendarScreen() {
  return (
    <Screen title="Calendar" subtitle="Bloom windows across the collection" testID="calendar-screen">
      <EmptyState
        title="No bloom windows yet"
        body="Forecasts appear here once leads have measurements, so you can see what is likely in flower on the day of a show."
      />
    </Screen>
  );
}
