import { Pressable, StyleSheet, View } from 'react-native';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { FINDING_SEVERITIES, FINDING_SEVERITY_LABELS, type FindingSeverity } from '@/shared/schemas/findings';
import { SEVERITY_HINTS } from './finding-words';

/** Four big radio buttons (at least 64 px tall, for gloved hands), each with its meaning written under it. */
export function SeverityChoice({
  value,
  onChange,
  error,
  label = 'How serious is it?',
}: {
  value: FindingSeverity | null;
  onChange: (severity: FindingSeverity) => void;
  error?: string;
  label?: string;
}) {
  const { width } = useBreakpoints();
  return (
    <View style={styles.field}>
      <Text variant="label" nativeID="finding-severity-label">
        {label}
      </Text>
      <View style={styles.grid} role="radiogroup" aria-labelledby="finding-severity-label" testID="finding-severity">
        {FINDING_SEVERITIES.map((severity) => (
          <Choice key={severity} severity={severity} selected={value === severity} onPress={() => onChange(severity)} half={width >= 360} />
        ))}
      </View>
      {error ? (
        <Text variant="caption" tone="danger" aria-live="polite" testID="finding-severity-error">
          {error}
        </Text>
      ) : null}
    </View>
  );
}

function Choice({ severity, selected, onPress, half }: { severity: FindingSeverity; selected: boolean; onPress: () => void; half: boolean }) {
  const ring = useFocusRing();
  const safety = severity === 'safety';
  return (
    <Pressable
      accessibilityRole="radio"
      accessibilityLabel={`${FINDING_SEVERITY_LABELS[severity]}: ${SEVERITY_HINTS[severity]}`}
      aria-checked={selected}
      onPress={onPress}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={`finding-severity-${severity}`}
      style={({ pressed }) => [
        styles.choice,
        half && styles.half,
        safety && styles.safety,
        selected && (safety ? styles.safetySelected : styles.selected),
        pressed && !selected && styles.pressed,
        ring.focused && styles.focused,
      ]}
    >
      <View style={styles.choiceHead}>
        {selected ? (
          <Icon name="check" size={sizes.iconSm} color={safety ? colors.danger : colors.primary} />
        ) : safety ? (
          <Icon name="warning" size={sizes.iconSm} color={colors.danger} />
        ) : null}
        <Text variant="heading" tone={safety ? 'danger' : selected ? 'primary' : 'default'}>
          {FINDING_SEVERITY_LABELS[severity]}
        </Text>
      </View>
      <Text variant="caption" tone={safety ? 'danger' : 'muted'}>
        {SEVERITY_HINTS[severity]}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  field: {
    gap: spacing.sm,
    alignSelf: 'stretch',
  },
  grid: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  choice: {
    minHeight: 64,
    flexGrow: 1,
    flexBasis: '100%',
    justifyContent: 'center',
    gap: spacing.xxs,
    paddingHorizontal: spacing.md,
    paddingVertical: spacing.sm,
    borderRadius: radii.md,
    borderWidth: 2,
    borderColor: colors.borderStrong,
    backgroundColor: colors.surface,
  },
  half: {
    flexBasis: '45%',
  },
  safety: {
    borderColor: colors.danger,
  },
  selected: {
    borderColor: colors.primary,
    backgroundColor: colors.primaryTint,
    borderWidth: 3,
  },
  safetySelected: {
    backgroundColor: colors.dangerTint,
    borderWidth: 3,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  choiceHead: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.xs,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
