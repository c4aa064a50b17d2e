import { Link, useRouter } from 'expo-router';
import { useDeferredValue, useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useAreasQuery, usePlantsQuery, type PlantFilters } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Chip } from '@/components/chip';
import { FilterRow } from '@/components/filter-row';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import { useIsWide } from '@/lib/use-is-wide';
import { COMMON_GENERA } from '@/shared/genera';
import { plantDisplayName } from '@/shared/plant-name';
import { leadStatuses, type PlantListItem } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';
import { useLeadStoriesQuery } from '@/api/queries/engine';
import type { LeadStoryResponse } from '@/shared/schemas/engine';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { LeadChip, STATUS_LABELS } from './components/lead-chip';

const PAGE_SIZE = 25;

export function PlantsScreen() {
  const router = useRouter();
  const wide = useIsWide();
  const { collectionId, canWrite, units } = useCollectionSettings();
  const [search, setSearch] = useState('');
  const [filters, setFilters] = useState<Omit<PlantFilters, 'q'>>({ sort: 'tag', page: 1 });
  const q = useDeferredValue(search.trim());
  const plants = usePlantsQuery(collectionId, { ...filters, q: q || undefined });
  const areas = useAreasQuery(collectionId);
  const stories = useLeadStoriesQuery(collectionId);
  const toggle = (key: 'genus' | 'areaId' | 'leadStatus', value: string) =>
    setFilters((f) => ({ ...f, page: 1, [key]: f[key] === value ? undefined : value }));
  const filtering = !!(q || filters.genus || filters.areaId || filters.leadStatus);

  return (
    <Screen title="Plants" testID="plants-screen">
      <View style={[styles.toolbar, wide && styles.toolbarWide]}>
        <View style={styles.search}>
          <TextField
            label="Search tag or name"
            value={search}
            onChangeText={(text) => {
              setSearch(text);
              setFilters((f) => ({ ...f, page: 1 }));
            }}
            placeholder="e.g. SH-014 or Lantern"
            testID="plant-search"
            autoCapitalize="none"
          />
        </View>
        {canWrite ? <Button label="Add a plant" onPress={() => router.push('/plants/new')} testID="add-plant" /> : null}
      </View>
      <FilterRow label="Genus">
        {COMMON_GENERA.map((g) => (
          <Chip key={g.abbreviation} label={g.abbreviation} selected={filters.genus === g.abbreviation} onPress={() => toggle('genus', g.abbreviation)} />
        ))}
      </FilterRow>
      {areas.data && areas.data.length > 0 ? (
        <FilterRow label="Area">
          {areas.data.map((a) => (
            <Chip key={a.id} label={a.name} selected={filters.areaId === a.id} onPress={() => toggle('areaId', a.id)} />
          ))}
        </FilterRow>
      ) : null}
      <FilterRow label="Lead status">
        {leadStatuses.map((s) => (
          <Chip key={s} label={STATUS_LABELS[s]} selected={filters.leadStatus === s} onPress={() => toggle('leadStatus', s)} />
        ))}
      </FilterRow>

      <QueryState
        query={plants}
        isEmpty={(page) => page.items.length === 0}
        empty={
          filtering
            ? { title: 'No plants match', body: 'Try fewer filters or another search.' }
            : {
                title: 'No plants yet — add your first plant',
                body: 'Each plant keeps its tag, its name, where it grows and its medium, and every lead it makes season after season.',
                action: canWrite ? <Button label="Add a plant" onPress={() => router.push('/plants/new')} /> : undefined,
              }
        }
      >
        {(page) => (
          <View style={styles.list} testID="plant-list">
            <Text variant="caption" color="textMuted" accessibilityLiveRegion="polite">
              {page.total} {page.total === 1 ? 'plant' : 'plants'}
            </Text>
            <View style={[styles.grid, wide && styles.gridWide]}>
              {page.items.map((plant) => (
                <PlantRow key={plant.id} plant={plant} units={units} wide={wide} stories={stories.data} />
              ))}
            </View>
            {page.total > PAGE_SIZE ? (
              <View style={styles.pager}>
                <Button label="Previous page" tone="secondary" disabled={page.page <= 1} onPress={() => setFilters((f) => ({ ...f, page: (f.page ?? 1) - 1 }))} />
                <Text>
                  Page {page.page} of {Math.ceil(page.total / page.pageSize)}
                </Text>
                <Button
                  label="Next page"
                  tone="secondary"
                  disabled={page.page * page.pageSize >= page.total}
                  onPress={() => setFilters((f) => ({ ...f, page: (f.page ?? 1) + 1 }))}
                />
              </View>
            ) : null}
          </View>
        )}
      </QueryState>
    </Screen>
  );
}

function PlantRow({ plant, units, wide, stories }: { plant: PlantListItem; units: 'mm' | 'in'; wide: boolean; stories: Map<string, LeadStoryResponse> | undefined }) {
  const where = [plant.areaName, plant.medium].filter(Boolean).join(' · ');
  return (
    <Link href={`/plants/${plant.id}`} asChild>
      <Pressable style={StyleSheet.flatten([styles.row, wide && styles.rowWide])} testID={`plant-row-${plant.tag}`} accessibilityRole="link">
        <View style={styles.rowHead}>
          <Text variant="bodyStrong">{plantDisplayName(plant)}</Text>
          <Text variant="caption" color="textMuted">
            {plant.tag}
            {where ? ` · ${where}` : ''}
          </Text>
        </View>
        <View style={styles.leads}>
          {plant.currentLeads.length === 0 ? (
            <Text variant="caption" color="textMuted">
              No leads recorded
            </Text>
          ) : (
            plant.currentLeads.map((lead) => <LeadChip key={lead.id} lead={lead} units={units} story={stories?.get(lead.id)} />)
          )}
        </View>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  toolbar: { gap: spacing.md },
  toolbarWide: { flexDirection: 'row', alignItems: 'flex-end' },
  search: { flex: 1 },
  list: { gap: spacing.md },
  grid: { gap: spacing.sm },
  gridWide: { flexDirection: 'row', flexWrap: 'wrap' },
  row: {
    padding: spacing.lg,
    gap: spacing.sm,
    borderRadius: radius.lg,
    borderWidth: 1,
    borderColor: colors.borderSubtle,
    backgroundColor: colors.surface,
  },
  rowWide: { width: '49%' },
  rowHead: { gap: spacing.xxs },
  leads: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.xs },
  pager: { flexDirection: 'row', alignItems: 'center', justifyContent: 'space-between', gap: spacing.md },
});
