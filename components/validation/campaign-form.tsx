import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { Controller, useFieldArray, useForm, useWatch, type Control } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { FormTextField } from '@/components/form/form-text-field';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Icon } from '@/components/ui/icon';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { fieldErrors } from '@/hooks/api/api-client';
import { conflictCurrentCampaign, useCreateCampaignMutation, useUpdateCampaignMutation } from '@/hooks/queries/validation';
import { CAMPAIGN_STEPS_MAX, type Campaign } from '@/shared/schemas/validation';
import {
  CampaignFormSchema,
  campaignFormValues,
  emptyCampaignForm,
  emptyStep,
  previewSteps,
  type CampaignFormInput,
  type CampaignFormOutput,
} from './campaign-form-schema';
import { CAMPAIGN_KIND_LABELS } from './campaign-summary';
import { formatTemperature, validationErrorMessage } from './validation-words';

export type CampaignFormProps = {
  assetId: string;
  /** The campaign to edit; without one the form plans a new campaign. */
  campaign?: Campaign;
  onDone: (message: string | null, campaign?: Campaign) => void;
};

/**
 * Plans a campaign or changes its steps. Each climate step shows its dew point and any
 * condensation caution as it is typed, from the same shared functions the server uses.
 */
export function CampaignForm({ assetId, campaign, onDone }: CampaignFormProps) {
  const create = useCreateCampaignMutation(assetId);
  const update = useUpdateCampaignMutation(campaign?.id ?? '');
  const [base, setBase] = useState(campaign);
  const [notice, setNotice] = useState<{ tone: 'danger' | 'warning'; message: string } | null>(null);
  const { control, handleSubmit, reset, setError } = useForm<CampaignFormInput, unknown, CampaignFormOutput>({
    resolver: zodResolver(CampaignFormSchema),
    defaultValues: campaign ? campaignFormValues(campaign) : emptyCampaignForm(),
  });
  const steps = useFieldArray({ control, name: 'steps' });
  const kind = useWatch({ control, name: 'kind' });
  const typed = useWatch({ control, name: 'steps' });
  const previews = previewSteps(typed ?? []);
  const tid = campaign ? `campaign-${campaign.id}-form` : 'campaign-form';

  const onSubmit = handleSubmit(async (values) => {
    setNotice(null);
    try {
      if (!base) {
        const saved = await create.mutateAsync(values);
        onDone(`Campaign “${saved.name}” planned.`, saved);
        return;
      }
      const saved = await update.mutateAsync({
        ...(values.name !== base.name ? { name: values.name } : {}),
        steps: values.steps,
        version: base.version,
      });
      onDone('Campaign saved.', saved);
    } catch (error) {
      const current = conflictCurrentCampaign(error);
      if (current) {
        setBase(current);
        reset(campaignFormValues(current));
        setNotice({ tone: 'warning', message: 'Someone else changed this campaign while you were editing it (perhaps recording hours). Their version is shown now; make your change again and save.' });
        return;
      }
      const fields = fieldErrors(error);
      let applied = false;
      for (const [name, message] of Object.entries(fields)) {
        if (name === 'name' || /^steps\.\d+\.\w+$/.test(name)) {
          setError(name as 'name', { type: 'server', message });
          applied = true;
        }
      }
      if (!applied) setNotice({ tone: 'danger', message: validationErrorMessage(error) });
    }
  });

  return (
    <Card testID={tid}>
      <Heading level={2} variant="heading">
        {base ? `Edit ${base.name}` : 'New test campaign'}
      </Heading>
      <FormTextField control={control} name="name" label="Name" placeholder="Damp heat and cold soak" testID="campaign-form-name" />
      {base ? (
        <Text tone="muted">{CAMPAIGN_KIND_LABELS[base.kind]}: steps are planned in {base.kind === 'climate' ? 'hours' : 'km'}.</Text>
      ) : (
        <Controller
          control={control}
          name="kind"
          render={({ field }) => (
            <Select
              label="Kind"
              layout="chips"
              value={field.value}
              onChange={field.onChange}
              hint={field.value === 'climate' ? 'Steps in a chamber, planned in hours, with temperature and humidity.' : 'Laps of a route, planned in km.'}
              options={[
                { value: 'climate', label: CAMPAIGN_KIND_LABELS.climate },
                { value: 'durability', label: CAMPAIGN_KIND_LABELS.durability },
              ]}
              testID="campaign-form-kind"
            />
          )}
        />
      )}
      {kind === 'durability' ? (
        <Notice tone="warning" message="Driving on public roads needs the permits and plates the local rules require; follow the site’s procedures for prototype vehicles." />
      ) : null}
      <Heading level={3} variant="bodyStrong">
        Steps, in order
      </Heading>
      <View style={styles.steps}>
        {steps.fields.map((field, index) => (
          <StepFields
            key={field.id}
            control={control}
            index={index}
            count={steps.fields.length}
            kind={kind}
            dewPoint={previews[index]?.dewPoint ?? null}
            caution={previews[index]?.caution ?? null}
            onMove={(to) => steps.move(index, to)}
            onRemove={() => steps.remove(index)}
          />
        ))}
      </View>
      {steps.fields.length < CAMPAIGN_STEPS_MAX ? (
        <Button label="Add a step" icon="plus" variant="secondary" compact onPress={() => steps.append(emptyStep())} testID="campaign-form-add-step" />
      ) : null}
      {notice ? <Notice tone={notice.tone} message={notice.message} testID="campaign-form-notice" /> : null}
      <View style={styles.buttons}>
        <Button label={base ? 'Save campaign' : 'Plan campaign'} onPress={() => void onSubmit()} loading={create.isPending || update.isPending} testID="campaign-form-save" />
        <Button label="Cancel" variant="ghost" onPress={() => onDone(null)} testID="campaign-form-cancel" />
      </View>
    </Card>
  );
}

function StepFields({
  control,
  index,
  count,
  kind,
  dewPoint,
  caution,
  onMove,
  onRemove,
}: {
  control: Control<CampaignFormInput, unknown, CampaignFormOutput>;
  index: number;
  count: number;
  kind: CampaignFormInput['kind'];
  dewPoint: number | null;
  caution: string | null;
  onMove: (to: number) => void;
  onRemove: () => void;
}) {
  const n = index + 1;
  const tid = `campaign-form-step-${index}`;
  return (
    <View style={styles.step} testID={tid}>
      <View style={styles.stepHead}>
        <Text variant="bodyStrong">Step {n}</Text>
        <View style={styles.stepButtons}>
          <Button label="Up" icon="arrow-up" variant="ghost" compact disabled={index === 0} onPress={() => onMove(index - 1)} accessibilityLabel={`Move step ${n} up`} />
          <Button label="Down" icon="arrow-down" variant="ghost" compact disabled={index === count - 1} onPress={() => onMove(index + 1)} accessibilityLabel={`Move step ${n} down`} />
          <Button label="Remove" variant="danger" compact disabled={count === 1} onPress={onRemove} accessibilityLabel={`Remove step ${n}`} testID={`${tid}-remove`} />
        </View>
      </View>
      <FormTextField control={control} name={`steps.${index}.name`} label="Step name" placeholder={kind === 'climate' ? 'Damp heat 40 °C' : 'Rough road loop'} testID={`${tid}-name`} />
      <View style={styles.fieldRow}>
        {kind === 'climate' ? (
          <>
            <View style={styles.field}>
              <FormTextField control={control} name={`steps.${index}.durationHours`} label="Duration, h" inputMode="decimal" testID={`${tid}-hours`} />
            </View>
            <View style={styles.field}>
              <FormTextField control={control} name={`steps.${index}.temperatureC`} label="Chamber, °C" inputMode="decimal" testID={`${tid}-temperature`} />
            </View>
            <View style={styles.field}>
              <FormTextField control={control} name={`steps.${index}.humidityPct`} label="Humidity, % RH" inputMode="decimal" testID={`${tid}-humidity`} />
            </View>
          </>
        ) : (
          <>
            <View style={[styles.field, styles.wideField]}>
              <FormTextField control={control} name={`steps.${index}.route`} label="Route" testID={`${tid}-route`} />
            </View>
            <View style={styles.field}>
              <FormTextField control={control} name={`steps.${index}.distanceKm`} label="Distance, km" inputMode="decimal" testID={`${tid}-km`} />
            </View>
            <View style={styles.field}>
              <FormTextField control={control} name={`steps.${index}.durationHours`} label="Duration, h (optional)" inputMode="decimal" testID={`${tid}-hours`} />
            </View>
          </>
        )}
      </View>
      {kind === 'climate' && dewPoint !== null ? (
        <Text variant="caption" testID={`${tid}-dew-point`}>
          Dew point {formatTemperature(dewPoint)}
        </Text>
      ) : null}
      {kind === 'climate' && caution ? (
        <View style={styles.caution} accessibilityRole="alert" testID={`${tid}-caution`}>
          <Icon name="warning" size={sizes.iconSm} color={colors.warning} />
          <Text variant="caption" tone="warning" style={styles.cautionText}>
            Condensation risk. {caution}
          </Text>
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  steps: {
    gap: spacing.md,
  },
  step: {
    gap: spacing.sm,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.bg,
  },
  stepHead: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: spacing.sm,
  },
  stepButtons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  fieldRow: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  field: {
    flexGrow: 1,
    flexBasis: 96,
    minWidth: 96,
  },
  wideField: {
    flexBasis: 200,
  },
  caution: {
    flexDirection: 'row',
    gap: spacing.xs,
    alignItems: 'flex-start',
    padding: spacing.sm,
    borderRadius: radii.sm,
    backgroundColor: colors.warningTint,
  },
  cautionText: {
    flex: 1,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
