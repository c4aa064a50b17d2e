import { Link, useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useLeadForecastQuery } from '@/api/queries/engine';
import { useAddMeasurementMutation, useLeadQuery, useMarkSheathMutation, useUpdateLeadMutation } from '@/api/queries/records';
import { useMeQuery } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Column, Columns } from '@/components/columns';
import { Confirm } from '@/components/confirm';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { formatDate, localToday } from '@/lib/dates';
import { formatLength } from '@/lib/units';
import { newClientKey } from '@/lib/uuid';
import { plantDisplayName } from '@/shared/plant-name';
import type { LeadDetail, SheathState } from '@/shared/schemas/records';
import { spacing } from '@/theme';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { PhotoStrip } from '../photos/components/photo-strip';
import { SHEATH_LABELS, STATUS_LABELS } from '../plants/components/lead-chip';
import { BloomForm } from './components/bloom-form';
import { MeasurementForm } from './components/measurement-form';
import { MeasurementTable } from './components/measurement-table';
import { LeadChart } from './components/lead-chart';
import { bloomSummary, leadChartData, leadSummary, trustSummary } from './lead-story';
import type { LengthUnit } from '@/lib/units';

const QUICK_SHEATH: SheathState[] = ['empty', 'budded', 'dry'];

export function LeadScreen() {
  const { leadId } = useLocalSearchParams<{ leadId: string }>();
  const { collectionId } = useCollectionSettings();
  const lead = useLeadQuery(collectionId, leadId);
  return (
    <QueryState query={lead} loadingLabel="Loading the lead…">
      {(data) => <LeadBody lead={data} />}
    </QueryState>
  );
}

function LeadBody({ lead }: { lead: LeadDetail }) {
  const me = useMeQuery();
  const settings = useCollectionSettings();
  const { collectionId, isOwner, units } = settings;
  // A lead of a read-only history copy (brought in with a division) takes no writes.
  const canWrite = settings.canWrite && !lead.plant.historyOnly;
  // A lead that dried off, rotted or was removed has no sheath to watch and nothing to end.
  const live = lead.status === 'growing' || lead.status === 'mature';
  const add = useAddMeasurementMutation(collectionId, lead.id);
  const mark = useMarkSheathMutation(collectionId, lead.id);
  const updateLead = useUpdateLeadMutation(collectionId, lead.id);
  const [ending, setEnding] = useState<'dried_off' | 'rotted' | null>(null);
  const last = lead.measurements.at(-1) ?? null;
  const markError = mark.error instanceof ApiError ? mark.error.message : undefined;

  const summary = last
    ? `Last measured ${formatDate(last.date)}: ${formatLength(last.heightMm, units)}, ${SHEATH_LABELS[last.sheath].toLowerCase()}.`
    : 'Not measured yet.';

  return (
    <Screen title={`Lead ${lead.label}`} subtitle={`${plantDisplayName(lead.plant)} · ${lead.plant.tag}`} testID="lead-screen">
      <Link href={`/plants/${lead.plant.id}`}>
        <Text color="accent">‹ {lead.plant.tag}</Text>
      </Link>
      <Card>
        <Text variant="bodyStrong" testID="lead-status">
          {STATUS_LABELS[lead.status]} · season {lead.season} · first seen {formatDate(lead.firstSeen)}
          {lead.fromBackBulb ? ' · from a back bulb' : ''}
        </Text>
        <Text testID="lead-summary">{summary}</Text>
        {canWrite && live && last ? (
          <View style={styles.group}>
            <Text variant="label">Mark the sheath today</Text>
            <View style={styles.row}>
              {QUICK_SHEATH.map((sheath) => (
                <Button
                  key={sheath}
                  label={SHEATH_LABELS[sheath]}
                  tone={last.sheath === sheath ? 'primary' : 'secondary'}
                  loading={mark.isPending && mark.variables?.sheath === sheath}
                  testID={`mark-sheath-${sheath}`}
                  onPress={() => mark.mutate({ date: localToday(), sheath, clientKey: newClientKey() })}
                />
              ))}
            </View>
            {markError ? <Text color="danger">{markError}</Text> : null}
          </View>
        ) : null}
        {canWrite && live ? (
          ending ? (
            <Confirm
              message={`Mark lead ${lead.label} as ${STATUS_LABELS[ending].toLowerCase()}? It stops counting as a growing lead.`}
              confirmLabel={`Mark ${STATUS_LABELS[ending].toLowerCase()}`}
              busy={updateLead.isPending}
              onCancel={() => setEnding(null)}
              onConfirm={() => updateLead.mutate({ status: ending, version: lead.version }, { onSettled: () => setEnding(null) })}
            />
          ) : (
            <View style={styles.row}>
              <Button label="Mark dried off" tone="danger" onPress={() => setEnding('dried_off')} testID="mark-dried-off" />
              <Button label="Mark rotted" tone="danger" onPress={() => setEnding('rotted')} testID="mark-rotted" />
            </View>
          )
        ) : null}
      </Card>
      <Columns>
        <Column>
          {lead.measurements.length > 0 ? <GrowthCard lead={lead} collectionId={collectionId} units={units} /> : null}
          <Card title="Photos" testID="lead-photos">
            <PhotoStrip
              collectionId={collectionId}
              subject={{ leadId: lead.id }}
              canWrite={canWrite}
              canDelete={(photo) => !lead.plant.historyOnly && (isOwner || (canWrite && photo.uploadedBy === me.data?.user.id))}
              attachOptions={[
                { label: 'This lead', target: { leadId: lead.id } },
                ...(last ? [{ label: `Measurement of ${formatDate(last.date)}`, target: { measurementId: last.id } }] : []),
              ]}
            />
          </Card>
          {canWrite ? (
            <Card title="Add a measurement" testID="add-measurement">
              <MeasurementForm key={last?.id ?? 'first'} last={last} units={units} onSave={(input) => add.mutateAsync({ ...input, clientKey: newClientKey() })} />
            </Card>
          ) : null}
        </Column>
        <Column>
          <Card title="Measurements">
            <MeasurementTable
              collectionId={collectionId}
              measurements={lead.measurements}
              units={units}
              canDelete={(m) => !lead.plant.historyOnly && (isOwner || (canWrite && m.createdBy === me.data?.user.id))}
            />
          </Card>
          <Card title="Bloom">
            <BloomForm key={lead.bloom?.version ?? 0} collectionId={collectionId} leadId={lead.id} bloom={lead.bloom} canWrite={canWrite} />
          </Card>
        </Column>
      </Columns>
    </Screen>
  );
}

/** The engine's reading of the lead: chart, sentence, flags, bloom window and trust. */
function GrowthCard({ lead, collectionId, units }: { lead: LeadDetail; collectionId: string; units: LengthUnit }) {
  const forecast = useLeadForecastQuery(collectionId, lead.id);
  const lastSeason = useLeadQuery(collectionId, forecast.data?.priorYears.lastSeason?.leadId);
  return (
    <Card title="Growth" testID="growth-card">
      <QueryState query={forecast} loadingLabel="Fitting the growth curve…">
        {(f) => {
          const bloom = bloomSummary(f);
          return (
            <View style={styles.group}>
              {f.flags.map((flag) => (
                <Text key={flag.kind} color="danger" variant="bodyStrong" role="alert" testID={`flag-${flag.kind}`}>
                  {flag.kind === 'aborted' ? 'Aborted' : 'Stalled'}: {flag.reason}
                </Text>
              ))}
              <LeadChart data={leadChartData(lead, f, lastSeason.data ?? null, units)} summary={leadSummary(f, units)} />
              {bloom ? <Text testID="bloom-summary">{bloom}</Text> : null}
              <Text variant="caption" color="textMuted" testID="trust-summary">
                {trustSummary(f)}
              </Text>
            </View>
          );
        }}
      </QueryState>
    </Card>
  );
}

const styles = StyleSheet.create({
  group: { gap: spacing.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
