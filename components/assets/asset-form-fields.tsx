import { useState } from 'react';
import { Controller, type Control, type FieldValues } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import { z } from 'zod';
import { FormTextField } from '@/components/form/form-text-field';
import { Select } from '@/components/ui/select';
import { spacing } from '@/components/theme/tokens';
import { checkVin } from '@/shared/domain/vin';
import {
  ASSET_KINDS,
  ASSET_KIND_LABELS,
  ASSET_STATUSES,
  ASSET_STATUS_LABELS,
  CreateAssetSchema,
  VinInputSchema,
  type Stage,
} from '@/shared/schemas/assets';
import { VinField } from './vin-field';

/** Text inputs hold strings; these turn them into the API's types with the shared schema's rules. */
const vinText = z
  .string()
  .pipe(VinInputSchema)
  .superRefine((vin, ctx) => {
    if (!vin) return;
    const check = checkVin(vin);
    if (!check.wellFormed) ctx.addIssue({ code: 'custom', message: check.problems.join(' ') });
  })
  .transform((vin) => (vin ? vin : null));

const odometerText = z
  .string()
  .trim()
  .refine((value) => value === '' || /^\d+(\.\d+)?$/.test(value), 'Enter the kilometres as a number, for example 1250.')
  .transform((value) => (value === '' ? 0 : Number(value)))
  .pipe(z.number().min(0).max(2_000_000, 'Use at most 2,000,000 km.'));

const dateText = z
  .string()
  .trim()
  .refine((value) => value === '' || /^\d{4}-\d{2}-\d{2}$/.test(value), 'Write the date as YYYY-MM-DD, for example 2026-03-14.')
  .transform((value) => (value === '' ? null : value))
  .pipe(z.iso.date('Not a real date.').nullable());

/** The fields both forms share, built from the contract's CreateAssetSchema. */
const sharedFields = CreateAssetSchema.pick({ tag: true, kind: true, status: true, location: true, notes: true }).extend({
  vin: vinText,
  odometerKm: odometerText,
  buildDate: dateText,
});

export const CreateAssetFormSchema = sharedFields.extend({
  stageId: z.string().min(1, 'Choose the stage the asset starts on.'),
});
export const EditAssetFormSchema = sharedFields;

export type AssetFormInput = z.input<typeof CreateAssetFormSchema>;
export type AssetFormOutput = z.output<typeof CreateAssetFormSchema>;
export type EditAssetFormInput = z.input<typeof EditAssetFormSchema>;
export type EditAssetFormOutput = z.output<typeof EditAssetFormSchema>;

const kindOptions = ASSET_KINDS.map((value) => ({ value, label: ASSET_KIND_LABELS[value] }));
const statusOptions = ASSET_STATUSES.map((value) => ({ value, label: ASSET_STATUS_LABELS[value] }));

type FieldsProps = {
  control: Control<AssetFormInput, unknown, AssetFormOutput> | Control<EditAssetFormInput, unknown, EditAssetFormOutput>;
  /** The create form picks the starting stage; the edit form moves stages elsewhere. */
  stages?: readonly Stage[];
};

/** Tag, kind, stage, status, location, VIN, odometer, build date and notes. */
export function AssetFormFields({ control: typedControl, stages }: FieldsProps) {
  const [vinLeft, setVinLeft] = useState(false);
  // Both forms share these field names; their output types differ only in stageId.
  const control = typedControl as unknown as Control<FieldValues>;
  const name = (field: keyof AssetFormInput) => field;
  return (
    <View style={styles.fields}>
      <FormTextField
        control={control}
        name={name('tag')}
        label="Tag"
        hint="Letters, digits and dashes, as on the asset, for example FW3-EP-014."
        autoCapitalize="characters"
        autoCorrect={false}
        autoComplete="off"
        testID="asset-form-tag"
      />
      <Controller
        control={control}
        name={name('kind')}
        render={({ field, fieldState }) => (
          <Select label="Kind" options={kindOptions} value={field.value} onChange={field.onChange} error={fieldState.error?.message} testID="asset-form-kind" />
        )}
      />
      {stages ? (
        <Controller
          control={control}
          name={name('stageId')}
          render={({ field, fieldState }) => (
            <Select
              label="Stage"
              layout="list"
              options={stages
                .filter((stage) => !stage.retired)
                .map((stage) => ({ value: stage.id, label: stage.name, testID: `asset-form-stage-${stage.name}` }))}
              value={field.value || null}
              onChange={field.onChange}
              error={fieldState.error?.message}
              hint="The stage's checklist is started for the asset."
              testID="asset-form-stage"
            />
          )}
        />
      ) : null}
      <Controller
        control={control}
        name={name('status')}
        render={({ field, fieldState }) => (
          <Select label="Status" options={statusOptions} value={field.value} onChange={field.onChange} error={fieldState.error?.message} testID="asset-form-status" />
        )}
      />
      <FormTextField control={control} name={name('location')} label="Location" placeholder="Bay 4" testID="asset-form-location" />
      <Controller
        control={control}
        name={name('vin')}
        render={({ field, fieldState }) => (
          <VinField
            ref={field.ref}
            value={typeof field.value === 'string' ? field.value : ''}
            onChangeText={field.onChange}
            onBlur={() => {
              setVinLeft(true);
              field.onBlur();
            }}
            error={fieldState.error?.message}
            finished={vinLeft}
            testID="asset-vin"
          />
        )}
      />
      <FormTextField
        control={control}
        name={name('odometerKm')}
        label="Odometer (km)"
        keyboardType="numeric"
        inputMode="decimal"
        testID="asset-form-odometer"
      />
      <FormTextField
        control={control}
        name={name('buildDate')}
        label="Build date"
        hint="YYYY-MM-DD, or leave empty."
        placeholder="2026-03-14"
        inputMode="numeric"
        testID="asset-form-build-date"
      />
      <FormTextField control={control} name={name('notes')} label="Notes" multiline numberOfLines={3} testID="asset-form-notes" />
    </View>
  );
}

const styles = StyleSheet.create({
  fields: {
    gap: spacing.lg,
  },
});
