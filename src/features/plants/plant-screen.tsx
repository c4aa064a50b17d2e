import { Link, useLocalSearchParams, useRouter } from 'expo-router';
import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { useAreasQuery, useDeletePlantMutation, usePlantQuery } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Column, Columns } from '@/components/columns';
import { Confirm } from '@/components/confirm';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { formatDate } from '@/lib/dates';
import { plantDisplayName } from '@/shared/plant-name';
import type { LeadSummary, PlantDetail } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';
import { useMeQuery } from '@/api/queries/session';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { PhotoStrip } from '../photos/components/photo-strip';
import { AddLeadForm } from './components/add-lead-form';
import { CareSection } from './components/care-section';
import { DivideForm } from './components/divide-form';
import { EditPlantForm } from './components/edit-plant-form';
import { HandoffBanner } from './components/handoff-banner';
import { HandoffSection } from './components/handoff-section';
import { useLeadStoriesQuery } from '@/api/queries/engine';
import { LeadChip } from './components/lead-chip';
import { Lineage } from './components/lineage';
import { PlantTrend } from './components/plant-trend';

type Panel = 'none' | 'lead' | 'edit' | 'divide' | 'delete';

export function PlantScreen() {
  const { plantId } = useLocalSearchParams<{ plantId: string }>();
  const { collectionId } = useCollectionSettings();
  const plant = usePlantQuery(collectionId, plantId);
  return (
    <QueryState query={plant} loadingLabel="Loading the plant…">
      {(data) => <PlantBody plant={data} />}
    </QueryState>
  );
}

function groupBySeason(leads: LeadSummary[]): Array<[number, LeadSummary[]]> {
  const seasons = new Map<number, LeadSummary[]>();
  for (const lead of leads) seasons.set(lead.season, [...(seasons.get(lead.season) ?? []), lead]);
  return [...seasons.entries()].sort((a, b) => b[0] - a[0]);
}

function PlantBody({ plant }: { plant: PlantDetail }) {
  const router = useRouter();
  const settings = useCollectionSettings();
  const { collectionId, isOwner, units, seasonStartMonth } = settings;
  // A read-only copy of another grower's record takes no writes at all.
  const canWrite = settings.canWrite && !plant.historyOnly;
  // A history copy takes no writes, but its owner may still drop it.
  const canDeleteHistory = plant.historyOnly && isOwner;
  const me = useMeQuery();
  const areas = useAreasQuery(collectionId);
  const stories = useLeadStoriesQuery(collectionId);
  const remove = useDeletePlantMutation(collectionId);
  const [panel, setPanel] = useState<Panel>('none');
  const close = () => setPanel('none');
  const facts = [
    plant.areaName && `Area: ${plant.areaName}`,
    plant.medium && `Medium: ${plant.medium}`,
    plant.acquiredOn && `Acquired ${formatDate(plant.acquiredOn)}`,
    plant.source && `From ${plant.source}`,
  ].filter(Boolean);

  return (
    <Screen title={plantDisplayName(plant)} subtitle={`Tag ${plant.tag}`} testID="plant-screen">
      <Link href="/plants">
        <Text color="accent">‹ All plants</Text>
      </Link>
      <HandoffBanner plant={plant} />
      <Columns>
        <Column>
          {facts.length > 0 || plant.notes || canWrite || canDeleteHistory ? (
            <Card>
              {facts.map((fact) => (
                <Text key={fact as string}>{fact}</Text>
              ))}
              {plant.notes ? <Text color="textMuted">{plant.notes}</Text> : null}
              {canWrite ? (
                <View style={styles.actions}>
                  <Button label="Add a lead" onPress={() => setPanel('lead')} testID="add-lead" />
                  <Button label="Edit" tone="secondary" onPress={() => setPanel('edit')} testID="edit-plant" />
                  <Button label="Divide" tone="secondary" onPress={() => setPanel('divide')} testID="divide-plant" />
                  {isOwner ? <Button label="Delete" tone="danger" onPress={() => setPanel('delete')} testID="delete-plant" /> : null}
                </View>
              ) : null}
              {canDeleteHistory && panel !== 'delete' ? (
                <View style={styles.actions}>
                  <Button label="Delete this history copy" tone="danger" onPress={() => setPanel('delete')} testID="delete-plant" />
                </View>
              ) : null}
              {panel === 'lead' ? <AddLeadForm collectionId={collectionId} plantId={plant.id} leads={plant.leads} seasonStartMonth={seasonStartMonth} onDone={close} /> : null}
              {panel === 'edit' ? <EditPlantForm collectionId={collectionId} plant={plant} areas={areas.data ?? []} onDone={close} /> : null}
              {panel === 'divide' ? <DivideForm collectionId={collectionId} plant={plant} onDone={close} /> : null}
              {panel === 'delete' ? (
                <Confirm
                  message={
                    plant.historyOnly
                      ? `Delete ${plant.tag}, the read-only history that came with a division? The division keeps its own records but its forecasts lose these earlier seasons. This cannot be undone.`
                      : `Delete ${plant.tag} with all its leads, measurements and care history? This cannot be undone.`
                  }
                  confirmLabel="Delete plant"
                  busy={remove.isPending}
                  onCancel={close}
                  onConfirm={() => remove.mutate(plant.id, { onSuccess: () => router.replace('/plants') })}
                />
              ) : null}
            </Card>
          ) : null}
          <Card title="Leads by season" testID="plant-leads">
            {plant.leads.length === 0 ? <Text color="textMuted">No leads recorded yet. Add the first new growth you see.</Text> : null}
            {groupBySeason(plant.leads).map(([season, leads]) => (
              <View key={season} style={styles.season}>
                <Text variant="label" color="textMuted">
                  Season {season}
                </Text>
                <View style={styles.leadRow}>
                  {leads.map((lead) => (
                    <Link key={lead.id} href={`/plants/${plant.id}/leads/${lead.id}`} asChild>
                      <Pressable accessibilityRole="link" testID={`lead-link-${lead.label}`} style={styles.leadLink}>
                        <LeadChip lead={lead} units={units} story={stories.data?.get(lead.id)} />
                      </Pressable>
                    </Link>
                  ))}
                </View>
              </View>
            ))}
          </Card>
          <Card title="Photos, all seasons" testID="plant-photos">
            <PhotoStrip
              collectionId={collectionId}
              subject={{ plantId: plant.id }}
              canWrite={canWrite}
              canDelete={(photo) => canWrite && (isOwner || photo.uploadedBy === me.data?.user.id)}
              attachOptions={[{ label: 'The whole plant', target: { plantId: plant.id } }]}
              describe={(photo) => {
                const lead = photo.leadId ? plant.leads.find((l) => l.id === photo.leadId) : undefined;
                return lead ? `lead ${lead.label}, ${lead.season}` : 'whole plant';
              }}
            />
          </Card>
        </Column>
        <Column>
          <PlantTrend collectionId={collectionId} plantId={plant.id} units={units} />
          <Lineage plant={plant} />
          <CareSection collectionId={collectionId} plantId={plant.id} entries={plant.care} areas={areas.data ?? []} canWrite={canWrite} />
          {canWrite && !plant.givenAwayOn ? <HandoffSection collectionId={collectionId} plant={plant} /> : null}
        </Column>
      </Columns>
    </Screen>
  );
}

const styles = StyleSheet.create({
  actions: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  season: { gap: spacing.xs },
  leadRow: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
  leadLink: { borderRadius: radius.sm, borderWidth: 1, borderColor: colors.borderSubtle },
});
