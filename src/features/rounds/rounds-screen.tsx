import { useRouter } from 'expo-router';
import { useEffect, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { useRoundsQuery, useSaveRoundOrderMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { storage } from '@/lib/storage';
import { formatLength, type LengthUnit } from '@/lib/units';
import { useToday } from '@/lib/use-today';
import { newClientKey } from '@/lib/uuid';
import { plantDisplayName } from '@/shared/plant-name';
import type { RoundStop } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { MeasurementForm } from '../leads/components/measurement-form';
import { useLeadStoriesQuery } from '@/api/queries/engine';
import { STATUS_LABELS } from '../plants/components/lead-chip';
import { outbox, useOutbox } from './outbox';

const positionKey = (collectionId: string) => `sympodia.rounds.${collectionId}.position`;

export function RoundsScreen() {
  const { collectionId, canWrite, units } = useCollectionSettings();
  const rounds = useRoundsQuery(collectionId);
  const [mode, setMode] = useState<'walk' | 'order'>('walk');
  return (
    <Screen title="Rounds" subtitle="The measuring walk" testID="rounds-screen">
      <QueryState
        query={rounds}
        isEmpty={(data) => data.stops.length === 0}
        empty={{
          title: 'No plants to walk yet',
          body: 'Once the collection has plants, Rounds takes you through them one at a time in the order you walk your benches, with last time’s values ready to change.',
        }}
      >
        {(data) =>
          mode === 'walk' ? (
            <Walk stops={data.stops} collectionId={collectionId} canWrite={canWrite} units={units} onEditOrder={() => setMode('order')} />
          ) : (
            <OrderEditor stops={data.stops} collectionId={collectionId} onDone={() => setMode('walk')} />
          )
        }
      </QueryState>
    </Screen>
  );
}

function Walk({ stops, collectionId, canWrite, units, onEditOrder }: { stops: RoundStop[]; collectionId: string; canWrite: boolean; units: LengthUnit; onEditOrder: () => void }) {
  const router = useRouter();
  const { waiting, refused, flush } = useOutbox(collectionId);
  const stories = useLeadStoriesQuery(collectionId);
  const [index, setIndex] = useState(() => {
    const saved = Number(storage.get(positionKey(collectionId)));
    return Number.isInteger(saved) && saved >= 0 ? Math.min(saved, stops.length - 1) : 0;
  });
  useEffect(() => storage.set(positionKey(collectionId), String(index)), [collectionId, index]);

  const stop = stops[Math.min(index, stops.length - 1)];
  const today = useToday();
  const leads = stop.leads.filter((l) => l.status === 'growing' || l.status === 'mature');
  const go = (delta: number) => setIndex((i) => Math.max(0, Math.min(stops.length - 1, i + delta)));

  return (
    <View style={styles.walk}>
      <View style={styles.progressRow}>
        <Text variant="heading" testID="rounds-progress" accessibilityLiveRegion="polite">
          {index + 1} of {stops.length}
        </Text>
        {canWrite ? <Button label="Change the order" tone="quiet" onPress={onEditOrder} testID="edit-order" /> : null}
      </View>
      <View style={styles.bar} accessibilityRole="progressbar" aria-label="Progress through the walk" aria-valuemin={1} aria-valuemax={stops.length} aria-valuenow={index + 1}>
        <View style={[styles.barFill, { width: `${((index + 1) / stops.length) * 100}%` }]} />
      </View>
      <OutboxStatus waiting={waiting.length} refused={refused} />
      <Card testID="rounds-stop">
        <Text variant="title" testID="rounds-plant">
          {stop.plant.tag} · {plantDisplayName(stop.plant)}
        </Text>
        <Text color="textMuted">{stop.plant.areaName ?? 'No area'}</Text>
        {leads.length === 0 ? <Text color="textMuted">No growing leads on this plant; nothing to measure.</Text> : null}
        {leads.map((lead) => (
          <View key={lead.id} style={styles.lead} testID={`rounds-lead-${lead.label}`}>
            <Text variant="heading">
              Lead {lead.label} · {stories.data?.get(lead.id)?.chip.label ?? STATUS_LABELS[lead.status]}
            </Text>
            {stories.data?.get(lead.id)?.flag ? (
              <Text color="warning" testID={`rounds-flag-${lead.label}`}>
                {stories.data.get(lead.id)!.flag}
              </Text>
            ) : null}
            {canWrite && lead.latest?.date === today ? (
              // A lead takes one look a day: today's is changed on the lead's page, not sent twice.
              <View style={styles.lookedAt} testID={`rounds-${lead.label}-done`}>
                <Text>
                  Looked at today: {formatLength(lead.latest.heightMm, units)}
                  {lead.latest.leafCount !== null ? `, ${lead.latest.leafCount} ${lead.latest.leafCount === 1 ? 'leaf' : 'leaves'}` : ''}.
                </Text>
                <Button
                  label="Change today's entry"
                  tone="secondary"
                  onPress={() => router.push(`/plants/${stop.plant.id}/leads/${lead.id}`)}
                  testID={`rounds-${lead.label}-change`}
                />
              </View>
            ) : canWrite ? (
              <MeasurementForm
                last={lead.latest}
                units={units}
                saveLabel="Save this lead"
                testIDPrefix={`rounds-${lead.label}`}
                onSave={async (input) => {
                  outbox.add({ clientKey: newClientKey(), collectionId, leadId: lead.id, label: `${stop.plant.tag} ${lead.label}`, input });
                  void flush();
                }}
              />
            ) : (
              <Button label="Open the lead" tone="secondary" onPress={() => router.push(`/plants/${stop.plant.id}/leads/${lead.id}`)} />
            )}
          </View>
        ))}
      </Card>
      <View style={styles.nav}>
        <Button label="‹ Previous plant" tone="secondary" disabled={index === 0} onPress={() => go(-1)} style={styles.navButton} testID="rounds-previous" />
        <Button label="Next plant ›" disabled={index >= stops.length - 1} onPress={() => go(1)} style={styles.navButton} testID="rounds-next" />
      </View>
    </View>
  );
}

function OutboxStatus({ waiting, refused }: { waiting: number; refused: ReturnType<typeof useOutbox>['refused'] }) {
  if (waiting === 0 && refused.length === 0) return null;
  return (
    <View style={styles.outbox} role="status" testID="outbox-status">
      {waiting > 0 ? (
        <Text>
          {waiting} {waiting === 1 ? 'entry is' : 'entries are'} kept on this device and will be sent when the connection returns.
        </Text>
      ) : null}
      {refused.map((entry) => (
        <View key={entry.clientKey} style={styles.refused}>
          <Text color="danger">
            {entry.label} ({entry.input.date}) was refused: {entry.refused}
          </Text>
          <Button label="Dismiss" tone="quiet" onPress={() => outbox.dismiss(entry.clientKey)} />
        </View>
      ))}
    </View>
  );
}

function OrderEditor({ stops, collectionId, onDone }: { stops: RoundStop[]; collectionId: string; onDone: () => void }) {
  const save = useSaveRoundOrderMutation(collectionId);
  const [order, setOrder] = useState(stops.map((s) => s.plant));
  const move = (i: number, delta: number) =>
    setOrder((all) => {
      const next = [...all];
      const j = i + delta;
      if (j < 0 || j >= next.length) return all;
      [next[i], next[j]] = [next[j], next[i]];
      return next;
    });
  const byAreaThenTag = () =>
    setOrder((all) => [...all].sort((a, b) => (a.areaName ?? '\uffff').localeCompare(b.areaName ?? '\uffff') || a.tag.localeCompare(b.tag, undefined, { numeric: true })));

  return (
    <Card title="The order you walk" testID="order-editor">
      <View style={styles.row}>
        <Button label="Sort by area, then tag" tone="secondary" onPress={byAreaThenTag} />
        <Button label="Save this order" loading={save.isPending} onPress={() => save.mutate(order.map((p) => p.id), { onSuccess: onDone })} testID="save-order" />
        <Button label="Cancel" tone="quiet" onPress={onDone} />
      </View>
      {order.map((plant, i) => (
        <View key={plant.id} style={styles.orderRow}>
          <Text style={styles.grow}>
            {i + 1}. {plant.tag} · {plantDisplayName(plant)}
            {plant.areaName ? ` · ${plant.areaName}` : ''}
          </Text>
          <Button label="↑" accessibilityLabel={`Move ${plant.tag} earlier`} tone="secondary" disabled={i === 0} onPress={() => move(i, -1)} />
          <Button label="↓" accessibilityLabel={`Move ${plant.tag} later`} tone="secondary" disabled={i === order.length - 1} onPress={() => move(i, 1)} />
        </View>
      ))}
    </Card>
  );
}

const styles = StyleSheet.create({
  walk: { gap: spacing.lg },
  progressRow: { flexDirection: 'row', justifyContent: 'space-between', alignItems: 'center' },
  bar: { height: 8, borderRadius: radius.pill, backgroundColor: colors.surfaceMuted, overflow: 'hidden' },
  barFill: { height: 8, backgroundColor: colors.accent },
  outbox: { gap: spacing.sm, padding: spacing.md, borderRadius: radius.md, backgroundColor: colors.warningSoft },
  refused: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, flexWrap: 'wrap' },
  lead: { gap: spacing.md, paddingTop: spacing.md, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
  lookedAt: { gap: spacing.sm },
  nav: { flexDirection: 'row', gap: spacing.md },
  navButton: { flex: 1, minHeight: 56 },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  orderRow: { flexDirection: 'row', alignItems: 'center', gap: spacing.sm, paddingVertical: spacing.xs, borderTopWidth: 1, borderTopColor: colors.borderSubtle },
  grow: { flex: 1 },
});
