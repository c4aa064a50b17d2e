import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/text';
import { formatLength, type LengthUnit } from '@/lib/units';
import type { ChipTone } from '@/domain/story';
import type { LeadStoryResponse } from '@/shared/schemas/engine';
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

const STATUS_TONE: Record<LeadStatus, ChipTone> = {
  growing: 'ok',
  mature: 'neutral',
  dried_off: 'alert',
  rotted: 'alert',
  removed: 'neutral',
};

/** Chip colours by the story's tone; the label always says the state in words. */
export const CHIP_TONES: Record<ChipTone, { background: string; text: 'success' | 'text' | 'danger' | 'warning' | 'accent' }> = {
  ok: { background: colors.successSoft, text: 'success' },
  neutral: { background: colors.surfaceMuted, text: 'text' },
  alert: { background: colors.dangerSoft, text: 'danger' },
  warning: { background: colors.warningSoft, text: 'warning' },
  bloom: { background: colors.accentSoft, text: 'accent' },
};

/**
 * One lead at a glance: label, its state in words (the engine's story when there is one — so a
 * stalled lead says "Stalled", as on Today — else its status), latest height and sheath.
 */
export function LeadChip({ lead, units, story }: { lead: LeadSummary; units: LengthUnit; story?: LeadStoryResponse }) {
  const label = story?.chip.label ?? STATUS_LABELS[lead.status];
  const tone = CHIP_TONES[story?.chip.tone ?? STATUS_TONE[lead.status]];
  const latest = lead.latest;
  return (
    <View style={[styles.chip, { backgroundColor: tone.background }]} testID={`lead-chip-${lead.label}`}>
      <Text variant="label" color={tone.text}>
        {lead.label} · {label}
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
