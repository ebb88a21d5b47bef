import { StyleSheet, View } from 'react-native';
import { Checkbox } from '@/components/ui/checkbox';
import { Icon } from '@/components/ui/icon';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { FLEET_ERROR_SENTENCES } from '@/shared/api/fleet-paths';
import type { RefusalReason } from '@/shared/schemas/fleet';
import { REFUSAL_TITLES } from './fleet-words';

/** The shared schema's own bound and words for a level override's reason. */
export const MIN_OVERRIDE_REASON = 5;
export const OVERRIDE_REASON_MESSAGE = 'Say in a few words why the driver may take this vehicle below its stage’s level.';

export type OverrideState = { on: boolean; reason: string };

/** True when a coordinator or lead may book anyway: every reason that stands is the level rule. */
export const overrideAllowed = (reasons: readonly RefusalReason[]) => reasons.length > 0 && reasons.every((r) => r.overridable);

/**
 * Every reason a booking was refused, each in words. The level rule may be overridden by a
 * coordinator or lead with a written reason once it is the only one left; the safety rule (a
 * vehicle that is not cleared) never may, and the panel says so.
 */
export function RefusalPanel({
  reasons,
  canOverride,
  override,
  onOverrideChange,
  reasonError,
  testID = 'book-refusal',
}: {
  reasons: readonly RefusalReason[];
  /** The person is a coordinator or lead. */
  canOverride: boolean;
  override: OverrideState;
  onOverrideChange: (next: OverrideState) => void;
  reasonError?: string;
  testID?: string;
}) {
  const safety = reasons.some((r) => r.code === 'vehicle-not-cleared');
  const hasOverridable = reasons.some((r) => r.overridable);
  const mayOverride = canOverride && overrideAllowed(reasons);
  const count = reasons.length;

  return (
    <View style={styles.panel} accessibilityRole="alert" testID={`${testID}-panel`}>
      <View style={styles.head}>
        <Icon name="warning" size={sizes.iconSm} color={colors.danger} />
        <Text variant="bodyStrong" tone="danger" style={styles.flex}>
          {FLEET_ERROR_SENTENCES['assignment/refused']} {count === 1 ? '1 reason.' : `${count} reasons.`}
        </Text>
      </View>
      <View role="list" testID={testID} style={styles.list}>
        {reasons.map((reason, index) => (
          <View key={`${reason.code}-${index}`} role="listitem" style={styles.item} testID={`${testID}-${reason.code}`}>
            <Text variant="label">
              {index + 1}. {REFUSAL_TITLES[reason.code] ?? 'Refused'}
            </Text>
            <Text>{reason.message}</Text>
            {reason.code === 'vehicle-not-cleared' ? (
              <Text variant="caption" tone="danger" weight="medium" testID={`${testID}-safety-note`}>
                The safety rule is never overridden: do not take this vehicle until its safety findings are resolved.
              </Text>
            ) : reason.overridable ? (
              <Text variant="caption" tone="muted">
                A coordinator or lead may override this rule with a written reason.
              </Text>
            ) : null}
          </View>
        ))}
      </View>
      {hasOverridable && !mayOverride ? (
        <Text variant="caption" tone="muted" testID={`${testID}-no-override`}>
          {!canOverride
            ? 'Only a coordinator or lead can override the level rule.'
            : safety
              ? 'The level rule cannot be overridden while the vehicle is not cleared.'
              : 'The level rule can be overridden only once the other reasons are resolved.'}
        </Text>
      ) : null}
      {mayOverride ? (
        <View style={styles.override}>
          <Checkbox
            label="Override the level rule"
            description="Kept on the assignment and in its history."
            checked={override.on}
            onChange={(on) => onOverrideChange({ ...override, on })}
            testID="book-override"
          />
          {override.on ? (
            <TextField
              label="Why may this driver take it?"
              value={override.reason}
              onChangeText={(reason) => onOverrideChange({ ...override, reason })}
              placeholder="For example: accompanied by a level 3 instructor"
              multiline
              error={reasonError}
              hint="A few words; the override is kept in the history."
              testID="book-override-reason"
            />
          ) : null}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  panel: {
    gap: spacing.md,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.danger,
    backgroundColor: colors.dangerTint,
  },
  head: {
    flexDirection: 'row',
    gap: spacing.sm,
    alignItems: 'flex-start',
  },
  flex: {
    flex: 1,
  },
  list: {
    gap: spacing.sm,
  },
  item: {
    gap: spacing.xxs,
    padding: spacing.sm,
    borderRadius: radii.sm,
    backgroundColor: colors.surface,
  },
  override: {
    gap: spacing.sm,
    padding: spacing.sm,
    borderRadius: radii.sm,
    backgroundColor: colors.surface,
  },
});
