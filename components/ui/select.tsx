import { useId } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { Chip } from './chip';
import { Icon } from './icon';
import { Text } from './text';
import { useFocusRing } from './use-focus-ring';

export type SelectOption<V extends string> = {
  value: V;
  label: string;
  description?: string;
  disabled?: boolean;
  testID?: string;
};

type BaseProps<V extends string> = {
  label: string;
  options: readonly SelectOption<V>[];
  /** `chips`: a wrapping row for a few short options; `list`: one row per option. */
  layout?: 'chips' | 'list';
  error?: string;
  hint?: string;
  hideLabel?: boolean;
  /** Container test id; each option gets `<testID>-<value>` unless it names its own. */
  testID?: string;
};

type SingleProps<V extends string> = BaseProps<V> & {
  multiple?: false;
  value: V | null;
  onChange: (value: V) => void;
};

type MultipleProps<V extends string> = BaseProps<V> & {
  multiple: true;
  value: readonly V[];
  onChange: (value: V[]) => void;
};

export type SelectProps<V extends string> = SingleProps<V> | MultipleProps<V>;

/** An accessible choice among a few options: radios for one, checkboxes for several. */
export function Select<V extends string>(props: SelectProps<V>) {
  const { label, options, layout = 'chips', error, hint, hideLabel = false, testID } = props;
  const labelId = `${useId().replace(/[^a-zA-Z0-9_-]/g, '')}-label`;

  const isSelected = (value: V) =>
    props.multiple ? props.value.includes(value) : props.value === value;

  const toggle = (value: V) => {
    if (props.multiple) {
      const next = props.value.includes(value)
        ? props.value.filter((item) => item !== value)
        : [...props.value, value];
      props.onChange(next);
    } else {
      props.onChange(value);
    }
  };

  const kind = props.multiple ? 'checkbox' : 'radio';
  const message = error ?? hint;

  return (
    <View style={styles.field}>
      <Text variant="label" nativeID={labelId} style={hideLabel ? styles.visuallyHidden : undefined}>
        {label}
      </Text>
      <View
        role={props.multiple ? 'group' : 'radiogroup'}
        aria-labelledby={labelId}
        testID={testID}
        style={layout === 'chips' ? styles.chips : styles.list}
      >
        {options.map((option) => {
          const optionTestID = option.testID ?? (testID ? `${testID}-${option.value}` : undefined);
          return layout === 'chips' ? (
            <Chip
              key={option.value}
              kind={kind}
              label={option.label}
              accessibilityLabel={option.description ? `${option.label}, ${option.description}` : undefined}
              selected={isSelected(option.value)}
              disabled={option.disabled}
              onPress={() => toggle(option.value)}
              testID={optionTestID}
            />
          ) : (
            <OptionRow
              key={option.value}
              kind={kind}
              option={option}
              selected={isSelected(option.value)}
              onPress={() => toggle(option.value)}
              testID={optionTestID}
            />
          );
        })}
      </View>
      {message ? (
        <Text variant="caption" tone={error ? 'danger' : 'muted'} aria-live={error ? 'polite' : undefined}>
          {message}
        </Text>
      ) : null}
    </View>
  );
}

function OptionRow<V extends string>({
  kind,
  option,
  selected,
  onPress,
  testID,
}: {
  kind: 'radio' | 'checkbox';
  option: SelectOption<V>;
  selected: boolean;
  onPress: () => void;
  testID?: string;
}) {
  const { focused, onFocus, onBlur } = useFocusRing();
  return (
    <Pressable
      accessibilityRole={kind}
      accessibilityLabel={option.description ? `${option.label}, ${option.description}` : option.label}
      aria-checked={selected}
      aria-disabled={option.disabled}
      disabled={option.disabled}
      onPress={onPress}
      onFocus={onFocus}
      onBlur={onBlur}
      testID={testID}
      style={({ pressed }) => [
        styles.row,
        selected && styles.rowSelected,
        pressed && !selected && styles.rowPressed,
        option.disabled && styles.rowDisabled,
        focused && styles.focused,
      ]}
    >
      <View style={[styles.indicator, kind === 'radio' ? styles.radio : styles.checkbox, selected && styles.indicatorOn]}>
        {selected ? <Icon name="check" size={sizes.iconXs} color={colors.onPrimary} /> : null}
      </View>
      <View style={styles.rowText}>
        <Text variant="bodyStrong" numberOfLines={1}>
          {option.label}
        </Text>
        {option.description ? (
          <Text variant="caption" tone="muted" numberOfLines={1}>
            {option.description}
          </Text>
        ) : null}
      </View>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  field: {
    gap: spacing.sm,
    alignSelf: 'stretch',
  },
  chips: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  list: {
    gap: spacing.xs,
  },
  row: {
    minHeight: sizes.control,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.md,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.sm,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  rowSelected: {
    backgroundColor: colors.primaryTint,
    borderColor: colors.primary,
  },
  rowPressed: {
    backgroundColor: colors.surfaceMuted,
  },
  rowDisabled: {
    opacity: 0.55,
  },
  rowText: {
    flex: 1,
    minWidth: 0,
  },
  indicator: {
    width: sizes.indicator,
    height: sizes.indicator,
    borderWidth: 2,
    borderColor: colors.borderStrong,
    alignItems: 'center',
    justifyContent: 'center',
    backgroundColor: colors.surface,
  },
  radio: {
    borderRadius: radii.pill,
  },
  checkbox: {
    borderRadius: radii.sm,
  },
  indicatorOn: {
    backgroundColor: colors.primary,
    borderColor: colors.primary,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
  visuallyHidden: {
    position: 'absolute',
    width: 1,
    height: 1,
    overflow: 'hidden',
    opacity: 0,
  },
});
