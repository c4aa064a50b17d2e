import { Link } from 'expo-router';
import { useMemo, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useCalendarQuery } from '@/api/queries/engine';
import { useAreasQuery, usePlantsQuery, type PlantFilters } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Chip } from '@/components/chip';
import { FilterRow } from '@/components/filter-row';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { formatDate } from '@/lib/dates';
import { useToday } from '@/lib/use-today';
import { useIsWide } from '@/lib/use-is-wide';
import type { BloomCalendarResponse } from '@/shared/schemas/engine';
import { colors, radius, spacing } from '@/theme';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { BloomTimeline, TimelineLegend } from './components/bloom-timeline';
import { ForecastTrust } from './components/forecast-trust';
import { addDays, addMonths, chanceText, isCalendarDate, RANGE_DAYS } from './timeline';

/*
 * The calendar answer carries no genus or area, so filters join it with the plant list. The
 * list route serves at most 100 a page (the demo has about 40 plants).
 */
const ALL_PLANTS: PlantFilters = { sort: 'tag', pageSize: 100 };

export function CalendarScreen() {
  const wide = useIsWide();
  const { collectionId } = useCollectionSettings();
  const today = useToday();
  const [offset, setOffset] = useState(0);
  const [onText, setOnText] = useState('');
  const [genus, setGenus] = useState<string | null>(null);
  const [areaId, setAreaId] = useState<string | null>(null);

  const from = offset === 0 ? today : addMonths(today, offset);
  const to = addDays(from, RANGE_DAYS);
  const on = isCalendarDate(onText) ? onText : undefined;
  const onError = onText.length >= 10 && !on ? 'Write the date as YYYY-MM-DD, e.g. 2027-04-12' : undefined;

  const calendar = useCalendarQuery(collectionId, { from, to, on });
  const plants = usePlantsQuery(collectionId, ALL_PLANTS);
  const areas = useAreasQuery(collectionId);

  const plantById = useMemo(() => new Map((plants.data?.items ?? []).map((p) => [p.id, p])), [plants.data]);
  const genera = useMemo(() => [...new Set((plants.data?.items ?? []).map((p) => p.genus))].sort(), [plants.data]);
  const keep = (plantId: string) => {
    if (!genus && !areaId) return true;
    const plant = plantById.get(plantId);
    if (!plant) return false;
    return (!genus || plant.genus === genus) && (!areaId || plant.areaId === areaId);
  };
  const filtering = !!(genus || areaId);

  return (
    <Screen fullWidth title="Calendar" subtitle="Bloom windows across the collection" testID="calendar-screen">
      <ForecastTrust collectionId={collectionId} />

      <View style={StyleSheet.flatten([styles.controls, wide ? styles.controlsWide : null])}>
        <View style={wide ? styles.rangeWide : styles.range}>
          <Text variant="label" color="textMuted">
            Months shown
          </Text>
          <Text variant="heading" testID="calendar-range" accessibilityLiveRegion="polite">
            {formatDate(from)} – {formatDate(to)}
          </Text>
          <View style={styles.rangeButtons}>
            <Button label="‹ A month earlier" tone="secondary" onPress={() => setOffset((o) => o - 1)} testID="calendar-earlier" />
            <Button label="A month later ›" tone="secondary" onPress={() => setOffset((o) => o + 1)} testID="calendar-later" />
            {offset !== 0 ? <Button label="From today" tone="quiet" onPress={() => setOffset(0)} testID="calendar-reset" /> : null}
          </View>
        </View>
        <View style={wide ? styles.dateWide : undefined}>
          <TextField
            label="Show what is in flower on"
            value={onText}
            onChangeText={(text) => setOnText(text.trim())}
            placeholder="YYYY-MM-DD"
            hint="A show, a sale or a visit: type its date, e.g. 2027-04-12"
            error={onError}
            inputMode="numeric"
            autoCapitalize="none"
            maxLength={10}
            testID="calendar-on-date"
          />
        </View>
      </View>

      <FilterRow label="Genus">
        {genera.map((g) => (
          <Chip key={g} label={g} selected={genus === g} onPress={() => setGenus((v) => (v === g ? null : g))} testID={`calendar-genus-${g}`} />
        ))}
      </FilterRow>
      {areas.data && areas.data.length > 0 ? (
        <FilterRow label="Area">
          {areas.data.map((a) => (
            <Chip key={a.id} label={a.name} selected={areaId === a.id} onPress={() => setAreaId((v) => (v === a.id ? null : a.id))} testID={`calendar-area-${a.id}`} />
          ))}
        </FilterRow>
      ) : null}

      <QueryState
        query={calendar}
        loadingLabel="Reading the bloom forecasts…"
        isEmpty={(data) => data.windows.length === 0 && !data.inFlowerOn?.length}
        empty={{
          title: 'No bloom windows in these months',
          body: 'Forecasts appear once leads have measurements. Try later months, or record a sheath or buds on a mature lead.',
        }}
      >
        {(data) => {
          const windows = data.windows.filter((w) => keep(w.plantId));
          return (
            <View style={styles.body}>
              {on ? <InFlowerOn data={data} on={on} keep={keep} filtering={filtering} wide={wide} /> : null}
              <Card title="Bloom windows" testID="calendar-windows">
                <Text variant="caption" color="textMuted" accessibilityLiveRegion="polite" testID="calendar-count">
                  {windows.length} {windows.length === 1 ? 'lead' : 'leads'} may flower in these months
                  {filtering ? ` (of ${data.windows.length}, with the filters above)` : ''}
                </Text>
                <TimelineLegend showsOn={!!on} />
                {windows.length === 0 ? (
                  <Text color="textMuted">No bloom windows match these filters; choose another genus or area.</Text>
                ) : (
                  <BloomTimeline windows={windows} from={data.from} to={data.to} today={data.today} on={on ?? null} wide={wide} />
                )}
              </Card>
            </View>
          );
        }}
      </QueryState>
    </Screen>
  );
}

function InFlowerOn({ data, on, keep, filtering, wide }: { data: BloomCalendarResponse; on: string; keep: (plantId: string) => boolean; filtering: boolean; wide: boolean }) {
  const fresh = data.on === on;
  const items = (fresh ? (data.inFlowerOn ?? []) : []).filter((i) => keep(i.plantId));
  return (
    <Card title={`Likely in flower on ${formatDate(on)}`} testID="in-flower-on">
      {!fresh ? (
        <Text color="textMuted">Looking up {formatDate(on)}…</Text>
      ) : items.length === 0 ? (
        <Text color="textMuted" testID="in-flower-none">
          Nothing is forecast to be in flower that day{filtering ? ' among the plants the filters show' : ''}.
        </Text>
      ) : (
        <View style={styles.flowerSections} testID="in-flower-list">
          {[true, false].map((likely) => {
            const group = items.filter((i) => i.likely === likely);
            if (group.length === 0) return null;
            return (
              <View key={String(likely)} style={styles.flowerSection}>
                <Text variant="label" color="textMuted" role="heading" aria-level={3}>
                  {likely ? `Within their likely flowering days (${group.length})` : `Only if they open early or last long (${group.length})`}
                </Text>
                <View style={styles.flowerList}>
                  {group.map((item) => (
                    <Link key={item.leadId} href={`/plants/${item.plantId}/leads/${item.leadId}`} asChild>
                      <Pressable accessibilityRole="link" style={StyleSheet.flatten([styles.flowerItem, wide ? styles.flowerItemWide : null])} testID={`in-flower-${item.plantTag}-${item.leadLabel}`}>
                        <View style={styles.flowerHead}>
                          <Text variant="bodyStrong" testID="in-flower-tag">
                            {item.plantTag}
                          </Text>
                          <Text variant="bodyStrong"> · lead {item.leadLabel}</Text>
                        </View>
                        <Text variant="caption">Chance of blooming: {chanceText(item.chance)}</Text>
                      </Pressable>
                    </Link>
                  ))}
                </View>
              </View>
            );
          })}
        </View>
      )}
    </Card>
  );
}

const styles = StyleSheet.create({
  controls: { gap: spacing.lg },
  controlsWide: { flexDirection: 'row', alignItems: 'flex-start', gap: spacing.xl },
  range: { gap: spacing.xs },
  rangeWide: { flex: 1, gap: spacing.xs },
  dateWide: { width: 380 },
  rangeButtons: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm, marginTop: spacing.xs },
  body: { gap: spacing.lg },
  flowerSections: { gap: spacing.lg },
  flowerSection: { gap: spacing.sm },
  flowerList: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  flowerItem: {
    width: '100%',
    padding: spacing.md,
    gap: spacing.xxs,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.borderSubtle,
    backgroundColor: colors.background,
  },
  flowerItemWide: { width: 'auto', minWidth: 240 },
  flowerHead: { flexDirection: 'row', flexWrap: 'wrap' },
});
