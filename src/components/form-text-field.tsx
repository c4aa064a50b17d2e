import { Controller, type Control, type FieldValues, type Path } from 'react-hook-form';
import { TextField, type TextFieldProps } from './text-field';

/** A TextField bound to a react-hook-form field; null values show as empty text. */
export function FormTextField<T extends FieldValues>({
  control,
  name,
  emptyAs = 'null',
  ...props
}: {
  control: Control<T>;
  name: Path<T>;
  /** What an emptied field holds: null (an optional record field) or '' (a required text the schema names as missing). */
  emptyAs?: 'null' | 'text';
} & Omit<TextFieldProps, 'value' | 'onChangeText' | 'error'>) {
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <TextField
          {...props}
          value={field.value ?? ''}
          onChangeText={(text) => field.onChange(text === '' && emptyAs === 'null' ? null : text)}
          onBlur={field.onBlur}
          error={fieldState.error?.message}
        />
      )}
    />
  );
}
