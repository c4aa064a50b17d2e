import { useLocalSearchParams, useRouter } from 'expo-router';
import { useMemo, useState } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { useCompareQuery, type CompareParams } from '@/api/queries/engine';
import { usePlantsQuery, type PlantFilters } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Chip } from '@/components/chip';
import { EmptyState, QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { useIsWide } from '@/lib/use-is-wide';
import type { PlantListItem } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { CompareTable, GroupChart } from './components/group-chart';
import { differenceSentence, scaleHalfWidth, testScope } from './summary';

type Grouping = CompareParams['by'];

const GROUPINGS: ReadonlyArray<{ value: Grouping; label: string }> = [
  { value: 'family', label: 'Division family' },
  { value: 'medium', label: 'Medium' },
  { value: 'area', label: 'Area' },
];

/** The list route serves at most 100 a page. */
const ALL_PLANTS: PlantFilters = { sort: 'tag', pageSize: 100 };

interface Family {
  root: PlantListItem;
  members: PlantListItem[];
}

/** Division families in the plant list: each plant's lineage root, kept when it has more than one member. */
function divisionFamilies(plants: PlantListItem[]): { families: Family[]; rootOf: (id: string) => string } {
  const byId = new Map(plants.map((p) => [p.id, p]));
  const rootOf = (id: string) => {
    let current = byId.get(id);
    const seen = new Set<string>();
    while (current?.parentPlantId && byId.has(current.parentPlantId) && !seen.has(current.id)) {
      seen.add(current.id);
      current = byId.get(current.parentPlantId);
    }
    return current?.id ?? id;
  };
  const members = new Map<string, PlantListItem[]>();
  for (const p of plants) {
    const root = rootOf(p.id);
    members.set(root, [...(members.get(root) ?? []), p]);
  }
  const families = [...members.entries()]
    .filter(([, m]) => m.length > 1)
    .map(([root, m]) => ({ root: byId.get(root)!, members: m }))
    .sort((a, b) => a.root.tag.localeCompare(b.root.tag, undefined, { numeric: true }));
  return { families, rootOf };
}

export function CompareScreen() {
  const wide = useIsWide();
  const router = useRouter();
  const params = useLocalSearchParams<{ by?: string; plantId?: string }>();
  const { collectionId } = useCollectionSettings();
  const plants = usePlantsQuery(collectionId, ALL_PLANTS);
  const [asTable, setAsTable] = useState(false);

  const by: Grouping = params.by === 'medium' || params.by === 'area' ? params.by : 'family';
  const { families, rootOf } = useMemo(() => divisionFamilies(plants.data?.items ?? []), [plants.data]);
  const plantId = by === 'family' ? (params.plantId ?? families[0]?.root.id) : undefined;
  const selectedRoot = plantId ? rootOf(plantId) : null;

  const request: CompareParams | null = by === 'family' ? (plantId ? { by, plantId } : null) : { by };
  const comparison = useCompareQuery(collectionId, request);

  const plantById = useMemo(() => new Map((plants.data?.items ?? []).map((p) => [p.id, p])), [plants.data]);
  /** Where a family member came from and what it grows in: the point of comparing divisions. */
  const familyNote = (id: string | undefined) => {
    const plant = id ? plantById.get(id) : undefined;
    if (!plant) return null;
    const parent = plant.parentPlantId ? plantById.get(plant.parentPlantId) : undefined;
    const origin = plant.parentPlantId ? `Divided from ${parent?.tag ?? 'its parent'}${plant.dividedOn ? ` on ${formatDate(plant.dividedOn)}` : ''}` : 'The parent plant';
    return plant.medium ? `${origin} · in ${plant.medium}` : origin;
  };

  const choose = (next: { by: Grouping; plantId?: string }) => router.setParams({ by: next.by, plantId: next.plantId });

  return (
    <Screen title="Compare" subtitle="Division families and groups of plants, season by season" testID="compare-screen">
      <Segmented label="Compare by" value={by} options={GROUPINGS} onChange={(value) => choose({ by: value, plantId: value === 'family' ? plantId : undefined })} testID="compare-by" />

      {by === 'family' ? (
        <View style={styles.picker} role="group" aria-label="Choose a division family">
          <Text variant="label" color="textMuted">
            Division family
          </Text>
          {plants.isPending ? (
            <Text color="textMuted">Loading the plants…</Text>
          ) : families.length === 0 ? null : (
            <ScrollView horizontal showsHorizontalScrollIndicator={false} contentContainerStyle={styles.chips}>
              {families.map((f) => (
                <Chip
                  key={f.root.id}
                  label={`${f.root.tag} and ${f.members.length - 1} ${f.members.length === 2 ? 'division' : 'divisions'}`}
                  selected={selectedRoot === f.root.id}
                  onPress={() => choose({ by: 'family', plantId: f.root.id })}
                  testID={`compare-family-${f.root.tag}`}
                />
              ))}
            </ScrollView>
          )}
        </View>
      ) : null}

      {by === 'family' && !plants.isPending && families.length === 0 && !params.plantId ? (
        <EmptyState
          title="No divisions recorded yet"
          body="When you divide a plant, its pieces form a family you can compare here, season by season. Meanwhile, compare plants by medium or by area."
        />
      ) : request ? (
        <QueryState
          query={comparison}
          loadingLabel="Comparing the groups…"
          isEmpty={(data) => data.groups.length === 0}
          empty={{ title: 'Nothing to compare yet', body: 'Comparisons need plants with finished leads in at least one season.' }}
        >
          {(data) => {
            const halfWidth = scaleHalfWidth(data.groups);
            const scope = testScope(data);
            return (
              <View style={styles.result}>
                <Card title="What the difference says" testID="compare-summary">
                  <Text testID="compare-sentence">{differenceSentence(data)}</Text>
                  {scope ? (
                    <Text variant="caption" color="textMuted">
                      {scope}
                    </Text>
                  ) : null}
                  {data.warnings.length > 0 ? (
                    <View style={styles.warnings} testID="compare-warnings">
                      <Text variant="label" color="warning">
                        Small groups — read with care
                      </Text>
                      {data.warnings.map((w) => (
                        <Text key={w} variant="caption">
                          • {w}
                        </Text>
                      ))}
                    </View>
                  ) : null}
                </Card>
                <View style={styles.chartHead}>
                  <View style={styles.chartTitle}>
                    <Text variant="heading" role="heading" aria-level={2}>
                      Lead size by season
                    </Text>
                    <Text variant="caption" color="textMuted">
                      Each plant's mature lead size divided by its own first season's (1.0). Bars to the right of the centre line mean larger leads, to the left smaller.
                    </Text>
                  </View>
                  <View style={styles.toggle}>
                    <Button label={asTable ? 'Show as chart' : 'Show as table'} tone="secondary" onPress={() => setAsTable((t) => !t)} testID="compare-toggle-table" />
                  </View>
                </View>
                {asTable ? (
                  <CompareTable groups={data.groups} />
                ) : (
                  <View style={StyleSheet.flatten([styles.groups, wide ? styles.groupsWide : null])} testID="compare-groups">
                    {data.groups.map((g) => (
                      <GroupChart key={g.name} group={g} halfWidth={halfWidth} by={data.by} wide={wide} note={data.by === 'family' ? familyNote(g.plants[0]?.plantId) : null} />
                    ))}
                  </View>
                )}
              </View>
            );
          }}
        </QueryState>
      ) : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  picker: { gap: spacing.xs },
  chips: { gap: spacing.xs, paddingRight: spacing.lg },
  result: { gap: spacing.lg },
  warnings: { gap: spacing.xs, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.warningSoft },
  chartHead: { gap: spacing.sm },
  chartTitle: { gap: spacing.xxs },
  toggle: { alignSelf: 'flex-start' },
  groups: { gap: spacing.md },
  groupsWide: { flexDirection: 'row', flexWrap: 'wrap' },
});
