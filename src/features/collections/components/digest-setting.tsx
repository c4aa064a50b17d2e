import { useDigestSettingMutation, useDigestSettingQuery } from '@/api/queries/mail';
import { Card } from '@/components/card';
import { QueryState } from '@/components/query-state';
import { Segmented } from '@/components/segmented';
import { Text } from '@/components/text';

const OPTIONS = [
  { value: 'on', label: 'Send it' },
  { value: 'off', label: 'No thanks' },
] as const;

/** The member's own choice about the weekly digest for this collection. */
export function DigestSetting({ collectionId }: { collectionId: string }) {
  const query = useDigestSettingQuery(collectionId);
  const change = useDigestSettingMutation(collectionId);
  return (
    <Card title="Weekly digest" testID="digest-setting">
      <Text color="textMuted">
        Once a week, an e-mail listing plants to bring in on cold nights, stalled and aborted leads, sheaths to check and bloom windows opening in
        the next fortnight; and a same-day warning when a night below a plant&apos;s limit is forecast within 24 hours.
      </Text>
      <QueryState query={query} loadingLabel="Loading your digest setting…">
        {(setting) => (
          <Segmented
            label="Weekly digest e-mail"
            value={setting.optedOut ? 'off' : 'on'}
            options={OPTIONS}
            onChange={(value) => change.mutate(value === 'off')}
            disabled={change.isPending}
            testID="digest-toggle"
          />
        )}
      </QueryState>
      {change.error ? (
        <Text color="danger" role="alert">
          {change.error.message}
        </Text>
      ) : null}
    </Card>
  );
}
