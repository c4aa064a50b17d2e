import { Link, useLocalSearchParams } from 'expo-router';
import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useLeadForecastQuery } from '@/api/queries/engine';
import { useAddMeasurementMutation, useLeadQuery, useMarkSheathMutation, useSaveBloomMutation, useUpdateLeadMutation } from '@/api/queries/records';
import { useMeQuery } from '@/api/queries/session';
import { Button } from '@/components/button';
import { Card } from '@/components/card';
import { Column, Columns } from '@/components/columns';
import { Confirm } from '@/components/confirm';
import { QueryState } from '@/components/query-state';
import { Screen } from '@/components/screen';
import { Text } from '@/components/text';
import { genusDefaultsFor, sheathMarksFor } from '@/domain';
import { NumberField, parseNumber } from '@/components/number-field';
import { formatDate } from '@/lib/dates';
import { formatLength, STEP, toMm } from '@/lib/units';
import { useToday } from '@/lib/use-today';
import type { LeadStoryResponse } from '@/shared/schemas/engine';
import { newClientKey } from '@/lib/uuid';
import { plantDisplayName } from '@/shared/plant-name';
import type { LeadDetail, SheathState } from '@/shared/schemas/records';
import { radius, spacing } from '@/theme';
import { useCollectionSettings } from '../collections/use-collection-settings';
import { PhotoStrip } from '../photos/components/photo-strip';
import { CHIP_TONES, SHEATH_LABELS, STATUS_LABELS } from '../plants/components/lead-chip';
import { BloomForm } from './components/bloom-form';
import { MeasurementForm } from './components/measurement-form';
import { MeasurementTable } from './components/measurement-table';
import { LeadChart } from './components/lead-chart';
import { leadChartData } from './lead-story';
import type { LengthUnit } from '@/lib/units';

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
  const updateLead = useUpdateLeadMutation(collectionId, lead.id);
  const forecast = useLeadForecastQuery(collectionId, lead.id);
  const [ending, setEnding] = useState<'dried_off' | 'rotted' | null>(null);
  const last = lead.measurements.at(-1) ?? null;
  // What this genus shows: a genus without a sheath (Stan., most Den.) gets no sheath marks.
  const genus = genusDefaultsFor(lead.plant.genus);
  const marks = sheathMarksFor(genus);

  const summary = last
    ? `Last measured ${formatDate(last.date)}: ${formatLength(last.heightMm, units)}${marks.length ? `, ${SHEATH_LABELS[last.sheath].toLowerCase()}` : ''}.`
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
        {forecast.data ? <StoryChip story={forecast.data.story} /> : null}
        {canWrite && live && last ? <QuickMarks lead={lead} marks={marks} units={units} collectionId={collectionId} /> : null}
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
              <MeasurementForm
                key={last?.id ?? 'first'}
                last={last}
                earlier={lead.measurements}
                spreadMm={forecast.data?.fit.residualSdMm ?? null}
                sheathStates={['none', ...marks]}
                units={units}
                onSave={(input) => add.mutateAsync({ ...input, clientKey: newClientKey() })}
              />
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

/** The lead's state on its chip, as Today, Plants and the Calendar show it. */
function StoryChip({ story }: { story: LeadStoryResponse }) {
  const tone = CHIP_TONES[story.chip.tone];
  return (
    <View style={StyleSheet.flatten([styles.chip, { backgroundColor: tone.background }])} testID="lead-story-chip">
      <Text variant="label" color={tone.text}>
        {story.chip.label}
      </Text>
    </View>
  );
}

/**
 * Quick marks for what the grower sees today: the sheath (a genus that flowers from one), and buds
 * or a spike showing (any genus; the bloom record's "buds first seen"). A sheath mark on a day
 * with a look changes that look; on a new day it asks for today's height, never carrying one
 * forward.
 */
function QuickMarks({ lead, marks, units, collectionId }: { lead: LeadDetail; marks: SheathState[]; units: LengthUnit; collectionId: string }) {
  const mark = useMarkSheathMutation(collectionId, lead.id);
  const saveBloom = useSaveBloomMutation(collectionId, lead.id);
  const today = useToday();
  const [pending, setPending] = useState<SheathState | null>(null);
  const [height, setHeight] = useState('');
  const last = lead.measurements.at(-1) ?? null;
  const lookedToday = lead.measurements.some((m) => m.date === today);
  const markError = mark.error instanceof ApiError ? (mark.error.fieldError('heightMm') ?? mark.error.message) : undefined;
  const bloomError = saveBloom.error instanceof ApiError ? saveBloom.error.message : undefined;
  const send = (sheath: SheathState, heightMm?: number) =>
    mark.mutate({ date: today, sheath, ...(heightMm !== undefined ? { heightMm } : {}), clientKey: newClientKey() }, { onSuccess: () => setPending(null) });
  const budsSeen = lead.bloom?.budsSeenOn ?? null;
  return (
    <View style={styles.group}>
      {marks.length ? (
        <>
          <Text variant="label">Mark the sheath today</Text>
          <View style={styles.row}>
            {marks.map((sheath) => (
              <Button
                key={sheath}
                label={SHEATH_LABELS[sheath]}
                tone={last?.sheath === sheath ? 'primary' : 'secondary'}
                loading={mark.isPending && mark.variables?.sheath === sheath}
                testID={`mark-sheath-${sheath}`}
                onPress={() => (lookedToday ? send(sheath) : setPending(sheath))}
              />
            ))}
          </View>
          {pending ? (
            <View style={styles.group} testID="mark-height">
              <NumberField
                label={`Height today (${units === 'mm' ? 'mm' : 'inches'}) — a new look needs the bulb's height`}
                value={height}
                onChange={setHeight}
                step={STEP[units]}
                decimals={units === 'in' ? 1 : 0}
                error={markError}
                testID="mark-height-value"
              />
              <View style={styles.row}>
                <Button
                  label={`Save: ${SHEATH_LABELS[pending].toLowerCase()}`}
                  onPress={() => {
                    const typed = parseNumber(height);
                    if (typed !== null) send(pending, toMm(typed, units));
                  }}
                  disabled={parseNumber(height) === null}
                  testID="mark-height-save"
                />
                <Button label="Cancel" tone="quiet" onPress={() => setPending(null)} testID="mark-height-cancel" />
              </View>
            </View>
          ) : markError ? (
            <Text color="danger">{markError}</Text>
          ) : null}
        </>
      ) : null}
      {!budsSeen && !lead.bloom?.firstOpenOn ? (
        <View style={styles.row}>
          <Button
            label="Buds or spike visible today"
            tone="secondary"
            loading={saveBloom.isPending}
            testID="mark-buds-visible"
            onPress={() =>
              saveBloom.mutate({
                budsSeenOn: today,
                firstOpenOn: lead.bloom?.firstOpenOn ?? null,
                lastFadedOn: lead.bloom?.lastFadedOn ?? null,
                flowerCount: lead.bloom?.flowerCount ?? null,
                spikeCount: lead.bloom?.spikeCount ?? null,
                ...(lead.bloom ? { version: lead.bloom.version } : {}),
              })
            }
          />
        </View>
      ) : budsSeen ? (
        <Text variant="caption" color="textMuted">
          Buds first seen {formatDate(budsSeen)}.
        </Text>
      ) : null}
      {bloomError ? <Text color="danger">{bloomError}</Text> : null}
    </View>
  );
}

/** The engine's reading of the lead: its story (the same sentences as every screen), the chart and the trust line. */
function GrowthCard({ lead, collectionId, units }: { lead: LeadDetail; collectionId: string; units: LengthUnit }) {
  const forecast = useLeadForecastQuery(collectionId, lead.id);
  const lastSeason = useLeadQuery(collectionId, forecast.data?.priorYears.lastSeason?.leadId);
  return (
    <Card title="Growth" testID="growth-card">
      <QueryState query={forecast} loadingLabel="Fitting the growth curve…">
        {(f) => {
          const story = f.story;
          const chance = story.chance;
          return (
            <View style={styles.group}>
              {story.flag ? (
                <Text color={f.flags.some((x) => x.kind === 'aborted') ? 'danger' : 'warning'} variant="bodyStrong" role="alert" testID={`flag-${f.flags[0].kind}`}>
                  {story.flag}
                </Text>
              ) : null}
              <LeadChart data={leadChartData(lead, f, lastSeason.data ?? null, units)} summary={[story.size, story.growth].filter(Boolean).join(' ')} />
              <Text testID="bloom-summary">
                {chance ? (
                  <Text variant="bodyStrong" aria-label={`Chance of flowering: ${chance.word}`}>
                    {`${chance.dots} `}
                  </Text>
                ) : null}
                {story.bloom}
              </Text>
              <Text variant="caption" color="textMuted" testID="trust-summary">
                {f.trustSentence}
              </Text>
            </View>
          );
        }}
      </QueryState>
    </Card>
  );
}

const styles = StyleSheet.create({
  chip: { alignSelf: 'flex-start', paddingHorizontal: spacing.sm, paddingVertical: spacing.xxs, borderRadius: radius.sm },
  group: { gap: spacing.xs },
  row: { flexDirection: 'row', flexWrap: 'wrap', gap: spacing.sm },
});
