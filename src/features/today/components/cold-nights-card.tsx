import { Link } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useColdNightsQuery } from '@/api/queries/cold-nights';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Text } from '@/components/text';
import { useInBrowser } from '@/lib/use-in-browser';
import { formatDate } from '@/lib/dates';
import type { BringInPlant, ColdNight, ColdNights } from '@/shared/schemas/cold-nights';
import { colors, radius, spacing } from '@/theme';

/** Tonight's list shows this many plants before "Show all". */
const FIRST_SHOWN = 6;

export const formatC = (c: number) => `${Number.isInteger(c) ? c : c.toFixed(1)} °C`;

/** "limit 13 °C (C. default)" or "limit 10 °C (own limit)". */
const limitText = (p: BringInPlant) => `limit ${formatC(p.limitC)} (${p.limitSource === 'plant' ? 'own limit' : `${p.name.split(' ')[0]} default`})`;

/**
 * Today's cold-night group: the outdoor plants to bring in tonight and on the next three
 * nights. A failed forecast is a muted line, not an error; with no location set only the
 * owner sees a hint.
 */
export function ColdNightsCard({ collectionId, isOwner }: { collectionId: string; isOwner: boolean }) {
  const query = useColdNightsQuery(collectionId);
  if (query.data?.status === 'no_location') {
    if (!isOwner) return null;
    return (
      <View style={styles.hint} testID="cold-nights-no-location">
        <Text color="textMuted">
          Set the collection’s location on the{' '}
          <Link href="/collection" style={styles.link}>
            Collection
          </Link>{' '}
          screen to be told which plants to bring in before a cold night.
        </Text>
      </View>
    );
  }
  if (query.data?.status === 'unavailable') {
    return (
      <View style={styles.hint} testID="cold-nights-unavailable">
        <Text color="textMuted">
          <Text variant="label" color="textMuted">
            Cold nights: forecast unavailable.
          </Text>{' '}
          Outdoor plants are not checked until it is back ({query.data.reason}).
        </Text>
      </View>
    );
  }
  return (
    <QueryState query={query} loadingLabel="Checking the night forecast…">
      {(data) => (data.status === 'ok' ? <Forecast data={data} /> : null)}
    </QueryState>
  );
}

function Forecast({ data }: { data: Extract<ColdNights, { status: 'ok' }> }) {
  const [tonight, ...later] = data.nights;
  const coldLater = later.filter((n) => n.plants.length > 0);
  if (!tonight) return null;
  if (tonight.plants.length === 0 && coldLater.length === 0) {
    return (
      <View style={styles.hint} testID="cold-nights-none">
        <Text color="textMuted">
          No cold nights ahead: tonight’s forecast low is {formatC(tonight.lowC)}, and no outdoor plant needs bringing in over the next {later.length} nights.
        </Text>
      </View>
    );
  }
  return (
    <Card title={tonight.plants.length > 0 ? `Bring in tonight (${tonight.plants.length})` : 'Cold nights ahead'} testID="cold-nights">
      {tonight.plants.length > 0 ? (
        <NightPlants night={tonight} label={`Tonight, ${formatDate(tonight.date)}: forecast low ${formatC(tonight.lowC)}`} testID="cold-night-tonight" />
      ) : (
        <Text color="textMuted">Tonight’s forecast low is {formatC(tonight.lowC)}: nothing to bring in.</Text>
      )}
      {coldLater.map((night) => (
        <LaterNight key={night.date} night={night} />
      ))}
      {data.unplacedPlants > 0 ? (
        <Text variant="caption" color="textMuted">
          {data.unplacedPlants} plant{data.unplacedPlants === 1 ? ' has' : 's have'} no area, so {data.unplacedPlants === 1 ? 'it is' : 'they are'} not checked.
        </Text>
      ) : null}
    </Card>
  );
}

function NightPlants({ night, label, testID }: { night: ColdNight; label: string; testID: string }) {
  const [all, setAll] = useState(false);
  const shown = all ? night.plants : night.plants.slice(0, FIRST_SHOWN);
  return (
    <View style={styles.night} testID={testID}>
      <Text variant="bodyStrong">{label}</Text>
      {shown.map((p) => (
        <PlantRow key={p.plantId} plant={p} />
      ))}
      {night.plants.length > FIRST_SHOWN ? (
        <Button
          label={all ? 'Show fewer' : `Show all ${night.plants.length}`}
          tone="quiet"
          onPress={() => setAll(!all)}
          accessibilityState={{ expanded: all }}
          testID={`${testID}-more`}
        />
      ) : null}
    </View>
  );
}

function LaterNight({ night }: { night: ColdNight }) {
  const [open, setOpen] = useState(false);
  // Not ready until the page's scripts have taken it over (a press before would do nothing).
  const ready = useInBrowser();
  const label = `${formatDate(night.date)}: forecast low ${formatC(night.lowC)}, ${night.plants.length} plant${night.plants.length === 1 ? '' : 's'} to bring in`;
  return (
    <View style={styles.later} testID={`cold-night-${night.date}`}>
      <Pressable
        accessibilityRole="button"
        accessibilityState={{ expanded: open, disabled: !ready }}
        accessibilityLabel={`${label}. ${open ? 'Hide' : 'Show'} the plants`}
        disabled={!ready}
        onPress={() => setOpen(!open)}
        style={styles.laterHead}
      >
        <Text style={styles.grow}>
          <Text variant="label">Night of </Text>
          {label}
        </Text>
        <Text variant="label" color="accent">
          {open ? 'Hide' : 'Show'}
        </Text>
      </Pressable>
      {open ? night.plants.map((p) => <PlantRow key={p.plantId} plant={p} />) : null}
    </View>
  );
}

function PlantRow({ plant }: { plant: BringInPlant }) {
  return (
    <Link href={`/plants/${plant.plantId}`} asChild>
      <Pressable accessibilityRole="link" style={styles.row} testID={`bring-in-${plant.tag}`}>
        <View style={StyleSheet.flatten([styles.marker, { backgroundColor: colors.warning }])} />
        <View style={styles.grow}>
          <Text variant="bodyStrong">
            {plant.tag} · {plant.name}
          </Text>
          <Text>
            {plant.areaName}: {limitText(plant)}, forecast {formatC(plant.lowC)}, {formatC(plant.marginC)} under
          </Text>
        </View>
      </Pressable>
    </Link>
  );
}

const styles = StyleSheet.create({
  hint: {
    paddingVertical: spacing.sm,
    paddingHorizontal: spacing.md,
    borderRadius: radius.md,
    borderWidth: 1,
    borderColor: colors.borderSubtle,
    backgroundColor: colors.surfaceMuted,
  },
  link: { color: colors.accent, textDecorationLine: 'underline' },
  night: { gap: spacing.xs },
  later: { gap: spacing.xs, borderTopWidth: 1, borderTopColor: colors.borderSubtle, paddingTop: spacing.sm },
  laterHead: { flexDirection: 'row', alignItems: 'center', gap: spacing.md, minHeight: 44 },
  row: { flexDirection: 'row', gap: spacing.md, paddingVertical: spacing.sm, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
  marker: { width: 4, borderRadius: 2 },
  grow: { flex: 1 },
});
