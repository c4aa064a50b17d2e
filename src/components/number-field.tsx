import { StyleSheet, View } from 'react-native';
import { spacing } from '@/theme';
import { Button } from './button';
import { TextField } from './text-field';

export interface NumberFieldProps {
  label: string;
  /** The typed text, kept as text so a half-typed "12." is not lost. */
  value: string;
  onChange: (text: string) => void;
  step?: number;
  min?: number;
  error?: string;
  hint?: string;
  testID?: string;
  decimals?: number;
}

/** A number input with large − and + buttons for thumbs and gloves. */
export function NumberField({ label, value, onChange, step = 1, min = 0, error, hint, testID, decimals = 0 }: NumberFieldProps) {
  const bump = (direction: 1 | -1) => {
    const current = Number.parseFloat(value);
    const next = Math.max(min, (Number.isFinite(current) ? current : 0) + direction * step);
    onChange(next.toFixed(decimals));
  };
  return (
    <View style={styles.row}>
      <View style={styles.field}>
        <TextField label={label} value={value} onChangeText={onChange} inputMode="decimal" error={error} hint={hint} testID={testID} />
      </View>
      <View style={styles.buttons}>
        <Button label="−" accessibilityLabel={`Less ${label.toLowerCase()}`} tone="secondary" onPress={() => bump(-1)} style={styles.button} testID={testID ? `${testID}-less` : undefined} />
        <Button label="+" accessibilityLabel={`More ${label.toLowerCase()}`} tone="secondary" onPress={() => bump(1)} style={styles.button} testID={testID ? `${testID}-more` : undefined} />
      </View>
    </View>
  );
}

/** Parses a typed number; blank is null, anything unreadable is NaN (for the schema to refuse). */
export function parseNumber(text: string): number | null {
  if (text.trim() === '') return null;
  const value = Number(text.replace(',', '.'));
  return Number.isFinite(value) ? value : Number.NaN;
}

const styles = StyleSheet.create({
  row: { flexDirection: 'row', alignItems: 'flex-end', gap: spacing.sm },
  field: { flex: 1 },
  buttons: { flexDirection: 'row', gap: spacing.xs, paddingBottom: 0 },
  button: { minWidth: 52 },
});
