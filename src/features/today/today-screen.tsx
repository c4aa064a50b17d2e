import { Link } from 'expo-router';
import { Pressable, StyleSheet, View } from 'react-native';
import { useAttentionQuery } from '@/api/queries/engine';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { formatLongDate } from '@/lib/format';
import { useIsWide } from '@/lib/use-is-wide';
import { useToday } from '@/lib/use-today';
import type { AttentionListResponse } from '@/shared/schemas/engine';
import { colors, radius, spacing } from '@/theme';
import { useCurrentCollection } from '../collections/current-collection';
import { ColdNightsCard } from './components/cold-nights-card';

type Item = AttentionListResponse['items'][number];

/** The groups of the attention list, in the order a grower should act on them. */
const GROUPS: Array<{ title: string; kinds: Item['kind'][]; tone: 'danger' | 'warning' | 'accent' | 'text' }> = [
  { title: 'Stalled or aborted', kinds: ['aborted', 'stalled'], tone: 'danger' },
  { title: 'Sheaths to check', kinds: ['sheath'], tone: 'warning' },
  { title: 'Bloom windows opening', kinds: ['bloom'], tone: 'accent' },
  { title: 'Due for measuring', kinds: ['measure'], tone: 'text' },
];

const KIND_LABEL: Record<Item['kind'], string> = {
  aborted: 'Aborted',
  stalled: 'Stalled',
  sheath: 'Sheath',
  bloom: 'Bloom window',
  measure: 'Measure',
};

export function TodayScreen() {
  const wide = useIsWide();
  const { collection } = useCurrentCollection();
  const attention = useAttentionQuery(collection?.id ?? '');
  const [year, month, day] = useToday().split('-').map(Number);
  return (
    <Screen title="Today" subtitle={`${formatLongDate(new Date(year, month - 1, day))}${collection ? ` · ${collection.name}` : ''}`} testID="today-screen">
      {collection ? <ColdNightsCard collectionId={collection.id} isOwner={collection.role === 'owner'} /> : null}
      <QueryState
        query={attention}
        loadingLabel="Looking over the collection…"
        isEmpty={(data) => data.items.length === 0}
        empty={{
          title: 'Nothing needs a look today',
          body: 'No lead is stalled, no sheath needs checking, no bloom window opens in the next two weeks and every growing lead has a recent measurement.',
        }}
      >
        {(data) => (
          <View style={[styles.groups, wide && styles.groupsWide]} testID="attention-list">
            {GROUPS.map((group) => {
              const items = data.items.filter((i) => group.kinds.includes(i.kind));
              if (items.length === 0) return null;
              return (
                <Card key={group.title} title={`${group.title} (${items.length})`} style={wide ? styles.groupWide : undefined} testID={`attention-${group.kinds[0]}`}>
                  {items.map((item) => (
                    <AttentionRow key={`${item.kind}-${item.target.leadId}`} item={item} tone={group.tone} />
                  ))}
                </Card>
              );
            })}
          </View>
        )}
      </QueryState>
    </Screen>
  );
}

function AttentionRow({ item, tone }: { item: Item; tone: 'danger' | 'warning' | 'accent' | 'text' }) {
  return (
    <Link href={`/plants/${item.target.plantId}/leads/${item.target.leadId}`} asChild>
      <Pressable accessibilityRole="link" style={styles.row} testID={`attention-item-${item.plantTag}-${item.leadLabel}`}>
        <View style={StyleSheet.flatten([styles.marker, { backgroundColor: colors[tone] }])} />
        <View style={styles.rowText}>
          <Text variant="bodyStrong">
            {item.plantTag} · lead {item.leadLabel} · {item.story.chip.label}
          </Text>
          <Text>
            <Text variant="label" color={tone === 'text' ? 'textMuted' : tone}>
              {KIND_LABEL[item.kind]}:{' '}
            </Text>
            {item.reason}
          </Text>
          {item.date && (item.kind === 'stalled' || item.kind === 'aborted') ? (
            <Text variant="caption" color="textMuted">
              since {formatDate(item.date)}
            </Text>
          ) : null}
        </View>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  groups: { gap: spacing.lg },
  groupsWide: { flexDirection: 'row', flexWrap: 'wrap', alignItems: 'flex-start' },
  groupWide: { width: '48.5%' },
  row: {
    flexDirection: 'row',
    gap: spacing.md,
    paddingVertical: spacing.sm,
    borderTopWidth: 1,
    borderTopColor: colors.borderSubtle,
    borderRadius: radius.sm,
  },
  marker: { width: 4, borderRadius: 2 },
  rowText: { flex: 1, gap: spacing.xxs },
});
