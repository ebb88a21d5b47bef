import { useState } from 'react';
import { Pressable, StyleSheet, View } from 'react-native';
import { PhotoGrid } from '@/components/photos/photo-grid';
import { PhotoPicker } from '@/components/photos/photo-picker';
import { Button } from '@/components/ui/button';
import { Badge, type BadgeTone } from '@/components/ui/chip';
import { Icon, type IconName } from '@/components/ui/icon';
import { Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, shadows, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { itemConflictCurrent, useUpdateChecklistItemMutation, type ChecklistItemChange } from '@/hooks/queries/assets';
import { ITEM_STATE_LABELS, type ChecklistItem, type ItemState } from '@/shared/schemas/assets';
import { formatDateTime } from './asset-words';

export const HV_CAUTION =
  'High-voltage: only qualified people work on this item, with the vehicle made safe per the site’s procedure.';
export const NA_REASON_REQUIRED = 'Say why this item does not apply.';
export const DEVIATION_REQUIRED = 'Describe the deviation in a few words.';

const STATE_TONES: Record<ItemState, BadgeTone> = {
  open: 'neutral',
  passed: 'success',
  deviation: 'warning',
  'not-applicable': 'neutral',
};

type Asking = 'na' | 'deviation' | null;

/** One checklist item: what to fit, how, and the technician's answer with part, notes and photos. */
export function ChecklistItemCard({ item, readOnly }: { item: ChecklistItem; readOnly: boolean }) {
  const update = useUpdateChecklistItemMutation(item.assetId);
  const [asking, setAsking] = useState<Asking>(null);
  const [naReason, setNaReason] = useState(item.naReason);
  const [description, setDescription] = useState('');
  const [fieldError, setFieldError] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [showInstructions, setShowInstructions] = useState(false);
  const [showDetails, setShowDetails] = useState(false);
  const [fittedPartNumber, setFittedPartNumber] = useState(item.fittedPartNumber);
  const [fittedRevision, setFittedRevision] = useState(item.fittedRevision);
  const [notes, setNotes] = useState(item.notes);
  const [saved, setSaved] = useState<string | null>(null);
  const tid = `item-${item.id}`;

  // A newer version (ours or someone else's) refreshes the part and notes fields unless they are open for editing.
  const [seenVersion, setSeenVersion] = useState(item.version);
  if (seenVersion !== item.version) {
    setSeenVersion(item.version);
    if (!showDetails) {
      setFittedPartNumber(item.fittedPartNumber);
      setFittedRevision(item.fittedRevision);
      setNotes(item.notes);
      setNaReason(item.naReason);
    }
  }

  const submit = async (change: Omit<ChecklistItemChange, 'itemId' | 'assetId' | 'version'>, done?: string) => {
    setError(null);
    setSaved(null);
    try {
      await update.mutateAsync({ ...change, itemId: item.id, assetId: item.assetId, version: item.version });
      setAsking(null);
      setDescription('');
      if (done) setSaved(done);
      return true;
    } catch (cause) {
      setError(
        itemConflictCurrent(cause)
          ? 'Someone else changed this item first; it now shows their answer. Yours was not saved: apply it again if it still holds.'
          : errorMessage(cause),
      );
      return false;
    }
  };

  const choose = (state: ItemState) => {
    setFieldError(null);
    if (state === 'not-applicable') {
      setAsking('na');
      return;
    }
    if (state === 'deviation') {
      // A deviation already filed keeps its finding; asking again would file a second one.
      if (item.state === 'deviation' && item.findingId) return;
      setAsking('deviation');
      return;
    }
    setAsking(null);
    if (item.state !== state) void submit({ state });
  };

  const confirmNa = () => {
    if (!naReason.trim()) {
      setFieldError(NA_REASON_REQUIRED);
      return;
    }
    void submit({ state: 'not-applicable', naReason: naReason.trim() });
  };

  const confirmDeviation = () => {
    if (description.trim().length < 3) {
      setFieldError(DEVIATION_REQUIRED);
      return;
    }
    void submit({ state: 'deviation', deviation: { description: description.trim() } });
  };

  const saveDetails = () =>
    void submit(
      {
        state: item.state,
        fittedPartNumber: fittedPartNumber.trim(),
        fittedRevision: fittedRevision.trim(),
        notes: notes.trim(),
        naReason: item.state === 'not-applicable' ? item.naReason : undefined,
      },
      'Details saved.',
    );

  const partDiffers =
    Boolean(item.fittedPartNumber && item.expectedPartNumber && item.fittedPartNumber !== item.expectedPartNumber) ||
    Boolean(item.fittedRevision && item.expectedRevision && item.fittedRevision !== item.expectedRevision);

  return (
    <View style={[styles.card, item.state === 'deviation' && styles.cardDeviation]} testID={tid}>
      <View style={styles.head}>
        <Text variant="bodyStrong" style={styles.title}>
          {item.title}
        </Text>
        <Badge label={ITEM_STATE_LABELS[item.state]} tone={STATE_TONES[item.state]} testID={`${tid}-state`} />
      </View>
      <View style={styles.tags}>
        {item.requiredForGate ? <Badge label="Required for the gate" tone="primary" testID={`${tid}-required`} /> : <Badge label="Optional" />}
        {item.hvQualified ? <Badge label="High-voltage qualified" tone="danger" /> : null}
      </View>
      {item.expectedPartNumber || item.expectedRevision ? (
        <Text variant="caption" tone="muted">
          Expected part {item.expectedPartNumber || '—'}
          {item.expectedRevision ? `, revision ${item.expectedRevision}` : ''}
        </Text>
      ) : null}
      {item.hvQualified ? (
        <View style={styles.hv} testID={`${tid}-hv`}>
          <Icon name="warning" size={sizes.iconSm} color={colors.danger} />
          <Text variant="caption" tone="danger" style={styles.flex}>
            {HV_CAUTION}
          </Text>
        </View>
      ) : null}
      {item.instructions ? (
        <View style={styles.instructions}>
          <Button
            label={showInstructions ? 'Hide instructions' : 'Show instructions'}
            icon={showInstructions ? 'arrow-up' : 'chevron-down'}
            variant="ghost"
            compact
            onPress={() => setShowInstructions((value) => !value)}
            accessibilityLabel={`${showInstructions ? 'Hide' : 'Show'} instructions for ${item.title}`}
            testID={`${tid}-instructions-toggle`}
          />
          {showInstructions ? <Text testID={`${tid}-instructions`}>{item.instructions}</Text> : null}
        </View>
      ) : null}

      {readOnly ? null : (
        <View style={styles.choices} role="group" aria-label={`Answer for ${item.title}`}>
          <Choice label="Passed" icon="check" active={item.state === 'passed'} onPress={() => choose('passed')} testID={`${tid}-passed`} itemTitle={item.title} />
          <Choice
            label="Deviation"
            icon="warning"
            active={item.state === 'deviation' || asking === 'deviation'}
            onPress={() => choose('deviation')}
            testID={`${tid}-deviation`}
            itemTitle={item.title}
          />
          <Choice label="N/A" spoken="Not applicable" active={item.state === 'not-applicable' || asking === 'na'} onPress={() => choose('not-applicable')} testID={`${tid}-na`} itemTitle={item.title} />
        </View>
      )}

      {asking === 'na' ? (
        <View style={styles.ask}>
          <TextField
            label="Why does this item not apply?"
            value={naReason}
            onChangeText={(text) => {
              setNaReason(text);
              setFieldError(null);
            }}
            error={fieldError ?? undefined}
            placeholder="For example: the bench rig has no seats"
            autoFocus
            testID="na-reason"
          />
          <View style={styles.row}>
            <Button label="Mark not applicable" compact onPress={confirmNa} loading={update.isPending} testID="na-submit" />
            <Button label="Cancel" variant="ghost" compact onPress={() => setAsking(null)} testID="na-cancel" />
          </View>
        </View>
      ) : null}

      {asking === 'deviation' ? (
        <View style={styles.ask}>
          <TextField
            label="What is wrong?"
            hint="A short description. It is filed as a finding linked to this item."
            value={description}
            onChangeText={(text) => {
              setDescription(text);
              setFieldError(null);
            }}
            error={fieldError ?? undefined}
            multiline
            autoFocus
            testID="deviation-description"
          />
          <View style={styles.row}>
            <Button label="File the deviation" compact onPress={confirmDeviation} loading={update.isPending} testID="deviation-submit" />
            <Button label="Cancel" variant="ghost" compact onPress={() => setAsking(null)} testID="deviation-cancel" />
          </View>
        </View>
      ) : null}

      {item.state === 'deviation' && item.findingId ? (
        <Notice tone="warning" message="Finding filed. An engineer follows it up." testID={`${tid}-finding`} />
      ) : null}
      {item.state === 'not-applicable' && item.naReason ? (
        <Text variant="caption" tone="muted">
          Not applicable: {item.naReason}
        </Text>
      ) : null}
      {item.fittedPartNumber || item.fittedRevision ? (
        <Text variant="caption" tone={partDiffers ? 'warning' : 'muted'} testID={`${tid}-fitted`}>
          Fitted part {item.fittedPartNumber || '—'}
          {item.fittedRevision ? `, revision ${item.fittedRevision}` : ''}
          {partDiffers ? ' — differs from the expected part' : ''}
        </Text>
      ) : null}
      {item.notes && !showDetails ? (
        <Text variant="caption" tone="muted">
          Notes: {item.notes}
        </Text>
      ) : null}
      <PhotoGrid photos={item.photos} size={64} label={item.title} testID={`${tid}-photos`} />

      {error ? <Notice message={error} testID={`${tid}-error`} /> : null}
      {saved ? <Notice tone="success" message={saved} /> : null}

      {readOnly ? null : (
        <Button
          label={showDetails ? 'Hide part, notes and photos' : 'Part fitted, notes and photos'}
          icon={showDetails ? 'arrow-up' : 'chevron-down'}
          variant="ghost"
          compact
          onPress={() => setShowDetails((value) => !value)}
          accessibilityLabel={`${showDetails ? 'Hide' : 'Record'} part fitted, notes and photos for ${item.title}`}
          testID={`${tid}-details-toggle`}
        />
      )}
      {showDetails && !readOnly ? (
        <View style={styles.details}>
          <View style={styles.pair}>
            <View style={styles.flex}>
              <TextField
                label="Fitted part number"
                value={fittedPartNumber}
                onChangeText={setFittedPartNumber}
                placeholder={item.expectedPartNumber || undefined}
                autoCapitalize="characters"
                autoCorrect={false}
                testID={`${tid}-fitted-part`}
              />
            </View>
            <View style={styles.revision}>
              <TextField
                label="Fitted revision"
                value={fittedRevision}
                onChangeText={setFittedRevision}
                placeholder={item.expectedRevision || undefined}
                autoCapitalize="characters"
                autoCorrect={false}
                testID={`${tid}-fitted-revision`}
              />
            </View>
          </View>
          <TextField label="Notes" value={notes} onChangeText={setNotes} multiline testID={`${tid}-notes`} />
          <Button label="Save details" compact onPress={saveDetails} loading={update.isPending} testID={`${tid}-save`} />
          <PhotoPicker assetId={item.assetId} checklistItemId={item.id} label="Add photo" testID={`${tid}-add-photo`} />
        </View>
      ) : null}

      <Text variant="caption" tone="muted" testID={`${tid}-changed`}>
        {item.updatedBy ? `Last changed by ${item.updatedBy}, ${formatDateTime(item.updatedAt)}` : 'Not answered yet.'}
      </Text>
    </View>
  );
}

function Choice({
  label,
  spoken,
  icon,
  active,
  onPress,
  testID,
  itemTitle,
}: {
  label: string;
  spoken?: string;
  icon?: IconName;
  active: boolean;
  onPress: () => void;
  testID: string;
  itemTitle: string;
}) {
  const ring = useFocusRing();
  return (
    <Pressable
      accessibilityRole="button"
      accessibilityLabel={`${spoken ? `${label}, ${spoken.toLowerCase()}` : label}: ${itemTitle}`}
      aria-pressed={active}
      onPress={onPress}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={testID}
      style={({ pressed }) => [styles.choice, active && styles.choiceActive, pressed && !active && styles.choicePressed, ring.focused && styles.focused]}
    >
      {icon ? <Icon name={icon} size={sizes.iconSm} color={active ? colors.onPrimary : colors.primary} /> : null}
      <Text variant="label" weight="semibold" tone={active ? 'onPrimary' : 'primary'}>
        {label}
      </Text>
    </Pressable>
  );
}

const styles = StyleSheet.create({
  card: {
    backgroundColor: colors.surface,
    borderRadius: radii.lg,
    borderWidth: 1,
    borderColor: colors.border,
    padding: spacing.md,
    gap: spacing.sm,
    ...shadows.card,
  },
  cardDeviation: {
    borderColor: colors.warning,
  },
  head: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.sm,
  },
  title: {
    flex: 1,
  },
  tags: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  hv: {
    flexDirection: 'row',
    gap: spacing.xs,
    padding: spacing.sm,
    borderRadius: radii.sm,
    borderWidth: 1,
    borderColor: colors.danger,
    backgroundColor: colors.dangerTint,
  },
  flex: {
    flex: 1,
    minWidth: 0,
  },
  instructions: {
    gap: spacing.xs,
  },
  choices: {
    flexDirection: 'row',
    gap: spacing.sm,
  },
  choice: {
    flex: 1,
    minHeight: sizes.touch,
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'center',
    gap: spacing.xs,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.borderStrong,
    backgroundColor: colors.surface,
    paddingHorizontal: spacing.sm,
  },
  choiceActive: {
    backgroundColor: colors.primary,
    borderColor: colors.primary,
  },
  choicePressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
  ask: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    backgroundColor: colors.surfaceMuted,
  },
  row: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  details: {
    gap: spacing.md,
  },
  pair: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  revision: {
    width: 120,
  },
});
