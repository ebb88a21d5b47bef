import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { can } from '@/components/assets/permissions';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge } from '@/components/ui/chip';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { errorMessage, fieldErrors, isApiError } from '@/hooks/api/api-client';
import {
  useCreateStageMutation,
  useDeleteStageMutation,
  useReorderStagesMutation,
  useStagesQuery,
  useUpdateStageMutation,
} from '@/hooks/queries/stages';
import { useSession } from '@/hooks/use-session';
import type { Stage } from '@/shared/schemas/assets';
import { GateSettingsForm } from './gate-settings-form';

type Feedback = { tone: 'success' | 'danger'; message: string } | null;

const CONFLICT = 'Someone else changed the stages first. The list is refreshed: try again.';

function failure(error: unknown): string {
  if (isApiError(error) && error.code === 'request/conflict') return CONFLICT;
  const fields = Object.values(fieldErrors(error));
  return fields.length > 0 ? fields.join(' ') : errorMessage(error);
}

/** The program's stages in order; a lead edits them, everyone else reads. */
export function StagesScreen() {
  const { user, currentProgramId, currentProgram } = useSession();
  const stages = useStagesQuery(currentProgramId);
  const editable = can.editStages(user?.role);
  const [feedback, setFeedback] = useState<Feedback>(null);

  return (
    <Screen testID="stages-screen">
      <PageTitle title="Stages" />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          Stages
        </Heading>
        <Text tone="muted">
          {currentProgram ? `The build phases of ${currentProgram.code}, in order. ` : ''}
          Moving an asset to a stage starts that stage’s checklist.
          {editable ? '' : ' Only a lead changes stages; engineers and leads edit the checklist templates.'}
        </Text>
      </View>
      {feedback ? <Notice tone={feedback.tone} message={feedback.message} testID="stages-notice" /> : null}
      {editable && currentProgramId ? <AddStage programId={currentProgramId} onFeedback={setFeedback} /> : null}
      {!currentProgramId ? (
        <EmptyState title="No program chosen" message="Join a program to see its stages." />
      ) : stages.isPending ? (
        <LoadingState label="Loading stages…" />
      ) : stages.isError ? (
        <ErrorState message={errorMessage(stages.error)} onRetry={() => void stages.refetch()} retrying={stages.isFetching} />
      ) : stages.data.length === 0 ? (
        <EmptyState title="No stages yet." />
      ) : (
        <View style={styles.list} testID="stages-list">
          {stages.data.map((stage, index) => (
            <StageCard
              key={stage.id}
              stage={stage}
              stages={stages.data}
              index={index}
              editable={editable}
              onFeedback={setFeedback}
            />
          ))}
        </View>
      )}
    </Screen>
  );
}

function AddStage({ programId, onFeedback }: { programId: string; onFeedback: (feedback: Feedback) => void }) {
  const create = useCreateStageMutation();
  const [name, setName] = useState('');
  const [error, setError] = useState<string | null>(null);
  const add = async () => {
    const trimmed = name.trim();
    if (!trimmed) {
      setError('Enter a name.');
      return;
    }
    setError(null);
    try {
      await create.mutateAsync({ programId, name: trimmed });
      setName('');
      onFeedback({ tone: 'success', message: `Stage ${trimmed} added at the end. Give it checklist items in its template.` });
    } catch (cause) {
      setError(failure(cause));
    }
  };
  return (
    <Card testID="stage-add">
      <Heading level={2} variant="heading">
        Add a stage
      </Heading>
      <TextField label="Stage name" value={name} onChangeText={setName} error={error ?? undefined} onSubmitEditing={() => void add()} testID="stage-add-name" />
      <Button label="Add stage" icon="plus" compact onPress={() => void add()} loading={create.isPending} testID="stage-add-submit" />
    </Card>
  );
}

function gateSummary(stage: Stage): string {
  const { gate } = stage;
  const w = gate.weights;
  const pct = (value: number) => `${Math.round(value * 100)} %`;
  return `Go from ${gate.goThreshold}, conditional from ${gate.conditionalThreshold}; findings budget ${gate.findingsBudget} points. Weights: checklist ${pct(w.checklist)}, findings ${pct(w.findings)}, software ${pct(w.software)}, validation ${pct(w.validation)}.`;
}

function StageCard({
  stage,
  stages,
  index,
  editable,
  onFeedback,
}: {
  stage: Stage;
  stages: readonly Stage[];
  index: number;
  editable: boolean;
  onFeedback: (feedback: Feedback) => void;
}) {
  const update = useUpdateStageMutation();
  const reorder = useReorderStagesMutation();
  const remove = useDeleteStageMutation();
  const [mode, setMode] = useState<'view' | 'rename' | 'gate' | 'delete'>('view');
  const [name, setName] = useState(stage.name);
  const [error, setError] = useState<string | null>(null);
  const tid = `stage-${index}`;

  const run = async (action: () => Promise<unknown>, done: string) => {
    setError(null);
    try {
      await action();
      setMode('view');
      onFeedback({ tone: 'success', message: done });
    } catch (cause) {
      setError(failure(cause));
    }
  };

  const move = (delta: -1 | 1) => {
    const ids = stages.map((item) => item.id);
    const target = index + delta;
    if (target < 0 || target >= ids.length) return;
    [ids[index], ids[target]] = [ids[target], ids[index]];
    void run(() => reorder.mutateAsync({ programId: stage.programId, stageIds: ids }), `${stage.name} moved ${delta < 0 ? 'up' : 'down'}.`);
  };

  const rename = () => {
    const trimmed = name.trim();
    if (!trimmed) {
      setError('Enter a name.');
      return;
    }
    void run(() => update.mutateAsync({ id: stage.id, version: stage.version, name: trimmed }), `Renamed to ${trimmed}.`);
  };

  const busy = update.isPending || reorder.isPending || remove.isPending;
  const count = stage.assetCount === 1 ? '1 asset' : `${stage.assetCount} assets`;

  return (
    <Card testID={tid}>
      <View style={styles.head}>
        <Text variant="label" tone="muted">
          {index + 1}
        </Text>
        <View style={styles.headText}>
          <Heading level={2} variant="heading" testID={`${tid}-name`}>
            {stage.name}
          </Heading>
          <View style={styles.badges}>
            <Badge label={count} tone="primary" testID={`${tid}-count`} />
            {stage.retired ? <Badge label="Retired" tone="warning" testID={`${tid}-retired`} /> : null}
            <Badge label={stage.minDriverLevel === 0 ? 'Not driven' : `Driving level ${stage.minDriverLevel}`} />
          </View>
        </View>
      </View>
      <Text variant="caption" tone="muted">
        {gateSummary(stage)}
      </Text>
      <TextLink href={`/stages/${stage.id}/template`} label="Checklist template" testID={`${tid}-template`} />

      {error ? <Notice message={error} testID={`${tid}-error`} /> : null}

      {editable && mode === 'view' ? (
        <View style={styles.buttons}>
          <Button label="Up" icon="arrow-up" variant="secondary" compact disabled={index === 0 || busy} accessibilityLabel={`Move ${stage.name} up`} onPress={() => move(-1)} testID={`${tid}-up`} />
          <Button
            label="Down"
            icon="arrow-down"
            variant="secondary"
            compact
            disabled={index === stages.length - 1 || busy}
            accessibilityLabel={`Move ${stage.name} down`}
            onPress={() => move(1)}
            testID={`${tid}-down`}
          />
          <Button label="Rename" variant="secondary" compact accessibilityLabel={`Rename ${stage.name}`} onPress={() => setMode('rename')} testID={`${tid}-rename`} />
          <Button label="Gate settings" variant="secondary" compact accessibilityLabel={`Gate settings of ${stage.name}`} onPress={() => setMode('gate')} testID={`${tid}-gate-open`} />
          <Button
            label={stage.retired ? 'Restore' : 'Retire'}
            variant="secondary"
            compact
            loading={update.isPending}
            accessibilityLabel={`${stage.retired ? 'Restore' : 'Retire'} ${stage.name}`}
            accessibilityHint={stage.retired ? undefined : 'Assets can no longer be moved to it; its history stays'}
            onPress={() =>
              void run(
                () => update.mutateAsync({ id: stage.id, version: stage.version, retired: !stage.retired }),
                stage.retired ? `${stage.name} is in use again.` : `${stage.name} is retired: assets can no longer be moved to it.`,
              )
            }
            testID={`${tid}-retire`}
          />
          <Button label="Delete" variant="danger" compact accessibilityLabel={`Delete ${stage.name}`} onPress={() => setMode('delete')} testID={`${tid}-delete`} />
        </View>
      ) : null}

      {mode === 'rename' ? (
        <View style={styles.inline}>
          <TextField label={`New name for ${stage.name}`} value={name} onChangeText={setName} onSubmitEditing={rename} autoFocus testID={`${tid}-rename-input`} />
          <View style={styles.buttons}>
            <Button label="Save name" compact onPress={rename} loading={update.isPending} testID={`${tid}-rename-save`} />
            <Button label="Cancel" variant="ghost" compact onPress={() => setMode('view')} />
          </View>
        </View>
      ) : null}

      {mode === 'gate' ? (
        <GateSettingsForm
          stage={stage}
          onDone={(message) => {
            setMode('view');
            if (message) onFeedback({ tone: 'success', message });
          }}
        />
      ) : null}

      {mode === 'delete' ? (
        <View style={styles.inline}>
          <Text>
            Delete the stage {stage.name}? Only a stage that no asset is on or has passed through can be deleted; otherwise retire it.
          </Text>
          <View style={styles.buttons}>
            <Button
              label={`Delete ${stage.name}`}
              variant="danger"
              compact
              loading={remove.isPending}
              onPress={() => void run(() => remove.mutateAsync({ id: stage.id }), `${stage.name} deleted.`)}
              testID={`${tid}-delete-confirm`}
            />
            <Button label="Cancel" variant="ghost" compact onPress={() => setMode('view')} />
          </View>
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.xs,
  },
  list: {
    gap: spacing.md,
  },
  head: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.md,
  },
  headText: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xs,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  inline: {
    gap: spacing.sm,
  },
});
