import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import { formatLength, type LengthUnit } from '@/lib/units';
import type { LeadStatus, LeadSummary, SheathState } from '@/shared/schemas/records';
import { colors, radius, spacing } from '@/theme';

export const STATUS_LABELS: Record<LeadStatus, string> = {
  growing: 'Growing',
  mature: 'Mature',
  dried_off: 'Dried off',
  rotted: 'Rotted',
  removed: 'Removed',
};

export const SHEATH_LABELS: Record<SheathState, string> = {
  none: 'No sheath',
  forming: 'Sheath forming',
  empty: 'Sheath empty',
  budded: 'Buds in sheath',
  dry: 'Sheath dry',
};

const STATUS_TONE: Record<LeadStatus, { background: string; text: 'success' | 'text' | 'danger' | 'textMuted' }> = {
  growing: { background: colors.successSoft, text: 'success' },
  mature: { background: colors.surfaceMuted, text: 'text' },
  dried_off: { background: colors.dangerSoft, text: 'danger' },
  rotted: { background: colors.dangerSoft, text: 'danger' },
  removed: { background: colors.surfaceMuted, text: 'textMuted' },
};

/** One lead at a glance: label, status in words, latest height and sheath. */
export function LeadChip({ lead, units }: { lead: LeadSummary; units: LengthUnit }) {
  const tone = STATUS_TONE[lead.status];
  const latest = lead.latest;
  return (
    <View style={[styles.chip, { backgroundColor: tone.background }]}>
      <Text variant="label" color={tone.text}>
        {lead.label} · {STATUS_LABELS[lead.status]}
      </Text>
      <Text variant="caption" color="text">
        {latest ? `${formatLength(latest.heightMm, units)} · ${SHEATH_LABELS[latest.sheath]}` : 'Not measured yet'}
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  chip: { paddingHorizontal: spacing.sm, paddingVertical: spacing.xs, borderRadius: radius.sm, gap: spacing.xxs },
});
