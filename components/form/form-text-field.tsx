import { Controller, type Control, type FieldPath, type FieldValues } from 'react-hook-form';
import { TextField, type TextFieldProps } from '@/components/ui/text-field';

export type FormTextFieldProps<T extends FieldValues, TOut extends FieldValues = T> = Omit<
  TextFieldProps,
  'value' | 'onChangeText' | 'onBlur' | 'error' | 'ref'
> & {
  /** `TOut` is what the resolver turns the inputs into (a zod schema with transforms). */
  control: Control<T, unknown, TOut>;
  name: FieldPath<T>;
};

/** A TextField bound to react-hook-form: value, blur, focus-on-error and the field's message. */
export function FormTextField<T extends FieldValues, TOut extends FieldValues = T>({ control, name, ...rest }: FormTextFieldProps<T, TOut>) {
  return (
    <Controller
      control={control}
      name={name}
      render={({ field, fieldState }) => (
        <TextField
          {...rest}
          ref={field.ref}
          value={typeof field.value === 'string' ? field.value : ''}
          onChangeText={field.onChange}
          onBlur={field.onBlur}
          error={fieldState.error?.message}
        />
      )}
    />
  );
}
