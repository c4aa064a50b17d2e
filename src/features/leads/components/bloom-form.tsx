import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { ApiError } from '@/api/client';
import { useSaveBloomMutation } from '@/api/queries/records';
import { Button } from '@/components/button';
import { Text } from '@/components/text';
import { TextField } from '@/components/text-field';
import type { BloomRecord } from '@/shared/schemas/records';
import { spacing } from '@/theme';

const numberOrNull = (text: string) => (text.trim() === '' ? null : Number(text));

/** Buds seen, first flower open, last faded, and the counts — one record per lead. */
export function BloomForm({ collectionId, leadId, bloom, canWrite }: { collectionId: string; leadId: string; bloom: BloomRecord | null; canWrite: boolean }) {
  const save = useSaveBloomMutation(collectionId, leadId);
  const [budsSeenOn, setBuds] = useState(bloom?.budsSeenOn ?? '');
  const [firstOpenOn, setOpen] = useState(bloom?.firstOpenOn ?? '');
  const [lastFadedOn, setFaded] = useState(bloom?.lastFadedOn ?? '');
  const [flowerCount, setFlowers] = useState(bloom?.flowerCount?.toString() ?? '');
  const [spikeCount, setSpikes] = useState(bloom?.spikeCount?.toString() ?? '');
  const error = save.error instanceof ApiError ? save.error : undefined;

  return (
    <View style={styles.form} testID="bloom-form">
      <TextField label="Buds first seen" value={budsSeenOn} onChangeText={setBuds} hint="YYYY-MM-DD" editable={canWrite} error={error?.fieldError('budsSeenOn')} />
      <TextField label="First flower open" value={firstOpenOn} onChangeText={setOpen} hint="YYYY-MM-DD" editable={canWrite} error={error?.fieldError('firstOpenOn')} />
      <TextField label="Last flower faded" value={lastFadedOn} onChangeText={setFaded} hint="YYYY-MM-DD" editable={canWrite} error={error?.fieldError('lastFadedOn')} />
      <View style={styles.pair}>
        <View style={styles.half}>
          <TextField label="Flowers" value={flowerCount} onChangeText={setFlowers} inputMode="numeric" editable={canWrite} error={error?.fieldError('flowerCount')} />
        </View>
        <View style={styles.half}>
          <TextField label="Spikes" value={spikeCount} onChangeText={setSpikes} inputMode="numeric" editable={canWrite} error={error?.fieldError('spikeCount')} />
        </View>
      </View>
      {error?.code === 'stale' ? <Text color="danger">Someone else changed this bloom record; the latest is shown. Make your change again.</Text> : null}
      {error && error.details.length === 0 && error.code !== 'stale' ? <Text color="danger">{error.message}</Text> : null}
      {save.isSuccess ? <Text color="success">Saved</Text> : null}
      {canWrite ? (
        <Button
          label="Save bloom record"
          tone="secondary"
          loading={save.isPending}
          testID="save-bloom"
          onPress={() =>
            save.mutate({
              budsSeenOn: budsSeenOn || null,
              firstOpenOn: firstOpenOn || null,
              lastFadedOn: lastFadedOn || null,
              flowerCount: numberOrNull(flowerCount),
              spikeCount: numberOrNull(spikeCount),
              ...(bloom ? { version: bloom.version } : {}),
            })
          }
        />
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  form: { gap: spacing.md },
  pair: { flexDirection: 'row', gap: spacing.md },
  half: { flex: 1 },
});
