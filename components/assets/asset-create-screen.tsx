import { zodResolver } from '@hookform/resolvers/zod';
import { useRouter } from 'expo-router';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { StyleSheet, View } from 'react-native';
import type { z } from 'zod';
import { applyServerFieldErrors } from '@/components/form/server-errors';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useCreateAssetMutation } from '@/hooks/queries/assets';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useSession } from '@/hooks/use-session';
import { AssetFormFields, CreateAssetFormSchema, type AssetFormInput } from './asset-form-fields';

const FIELDS = ['tag', 'kind', 'stageId', 'status', 'location', 'vin', 'odometerKm', 'buildDate', 'notes'] as const;

export function AssetCreateScreen() {
  const router = useRouter();
  const { currentProgramId, currentProgram } = useSession();
  const stages = useStagesQuery(currentProgramId);
  const create = useCreateAssetMutation();
  const [formError, setFormError] = useState<string | null>(null);
  const { control, handleSubmit, setError } = useForm<AssetFormInput, unknown, z.output<typeof CreateAssetFormSchema>>({
    resolver: zodResolver(CreateAssetFormSchema),
    defaultValues: {
      tag: '',
      kind: 'vehicle',
      stageId: '',
      status: 'in-build',
      location: '',
      vin: '',
      odometerKm: '',
      buildDate: '',
      notes: '',
    },
  });

  const onSubmit = handleSubmit(async (values) => {
    if (!currentProgramId) return;
    setFormError(null);
    try {
      const asset = await create.mutateAsync({ ...values, programId: currentProgramId });
      router.replace(`/assets/${asset.id}`);
    } catch (error) {
      if (!applyServerFieldErrors(error, setError, FIELDS)) setFormError(errorMessage(error));
    }
  });

  return (
    <Screen narrow testID="asset-create">
      <PageTitle title="New asset" />
      <TextLink href="/assets" label="Back to assets" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          New asset
        </Heading>
        {currentProgram ? (
          <Text tone="muted">
            In {currentProgram.code} · {currentProgram.name}
          </Text>
        ) : null}
      </View>
      {stages.isPending ? (
        <LoadingState label="Loading stages…" />
      ) : stages.isError ? (
        <ErrorState message={errorMessage(stages.error)} onRetry={() => void stages.refetch()} />
      ) : (
        <Card>
          <AssetFormFields control={control} stages={stages.data} />
          {formError ? <Notice message={formError} testID="asset-form-error" /> : null}
          <Button label="Add asset" onPress={() => void onSubmit()} loading={create.isPending} fullWidth testID="asset-form-submit" />
        </Card>
      )}
    </Screen>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.xs,
  },
});
