import { useId, useState, type Ref } from 'react';
import { Pressable, StyleSheet, TextInput, View, type TextInputProps } from 'react-native';
import { useFontsLoaded } from '@/components/theme/font-state';
import { colors, fontFor, radii, sizes, spacing, typeScale } from '@/components/theme/tokens';
import { Text } from './text';
import { useFocusRing } from './use-focus-ring';
import { webOnly } from './web-props';

export type TextFieldProps = Omit<TextInputProps, 'style' | 'secureTextEntry' | 'accessibilityLabel'> & {
  label: string;
  error?: string;
  hint?: string;
  /** A password: masked, with a Show / Hide control. */
  secret?: boolean;
  ref?: Ref<TextInput>;
};

export function TextField({ label, error, hint, secret = false, ref, testID, onFocus, onBlur, editable, ...rest }: TextFieldProps) {
  const fontsLoaded = useFontsLoaded();
  const [focused, setFocused] = useState(false);
  const [revealed, setRevealed] = useState(false);
  const toggleRing = useFocusRing();
  const id = useId().replace(/[^a-zA-Z0-9_-]/g, '');
  const messageId = `${id}-message`;
  const message = error ?? hint;

  return (
    <View style={styles.field}>
      <Text variant="label" nativeID={`${id}-label`}>
        {label}
      </Text>
      <View style={styles.inputRow}>
        <TextInput
          ref={ref}
          testID={testID}
          accessibilityLabel={label}
          editable={editable}
          secureTextEntry={secret && !revealed}
          placeholderTextColor={colors.textMuted}
          onFocus={(event) => {
            setFocused(true);
            onFocus?.(event);
          }}
          onBlur={(event) => {
            setFocused(false);
            onBlur?.(event);
          }}
          style={[
            styles.input,
            fontFor('regular', fontsLoaded),
            secret && styles.inputWithToggle,
            error ? styles.inputError : null,
            focused && styles.inputFocused,
            editable === false && styles.inputDisabled,
          ]}
          {...webOnly({
            'aria-invalid': error ? true : undefined,
            'aria-describedby': message ? messageId : undefined,
          })}
          {...rest}
        />
        {secret ? (
          <Pressable
            accessibilityRole="button"
            accessibilityLabel={revealed ? `Hide ${label.toLowerCase()}` : `Show ${label.toLowerCase()}`}
            onPress={() => setRevealed((value) => !value)}
            onFocus={toggleRing.onFocus}
            onBlur={toggleRing.onBlur}
            style={[styles.toggle, toggleRing.focused && styles.toggleFocused]}
          >
            <Text variant="label" tone="primary">
              {revealed ? 'Hide' : 'Show'}
            </Text>
          </Pressable>
        ) : null}
      </View>
      {message ? (
        <Text
          variant="caption"
          tone={error ? 'danger' : 'muted'}
          nativeID={messageId}
          aria-live={error ? 'polite' : undefined}
          testID={testID && error ? `${testID}-error` : undefined}
        >
          {message}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  field: {
    gap: spacing.xs,
    alignSelf: 'stretch',
  },
  inputRow: {
    justifyContent: 'center',
  },
  input: {
    minHeight: sizes.control,
    borderWidth: 1,
    borderColor: colors.borderStrong,
    borderRadius: radii.md,
    backgroundColor: colors.surface,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.sm,
    fontSize: typeScale.body.fontSize,
    color: colors.text,
    outlineStyle: 'solid',
    outlineWidth: 0,
    outlineColor: colors.focus,
  },
  inputWithToggle: {
    paddingRight: sizes.touch + spacing.xl + spacing.xs,
  },
  inputError: {
    borderColor: colors.danger,
    borderWidth: 2,
  },
  inputFocused: {
    borderColor: colors.primary,
    outlineWidth: sizes.focusRing,
    outlineOffset: 1,
  },
  inputDisabled: {
    backgroundColor: colors.surfaceMuted,
    color: colors.textMuted,
  },
  toggle: {
    position: 'absolute',
    right: spacing.xs,
    minHeight: sizes.touch,
    minWidth: sizes.touch + spacing.md,
    paddingHorizontal: spacing.sm,
    alignItems: 'center',
    justifyContent: 'center',
    borderRadius: radii.sm,
  },
  toggleFocused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
  },
});
