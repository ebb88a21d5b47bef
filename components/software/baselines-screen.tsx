import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge, type BadgeTone } from '@/components/ui/chip';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { colors, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import {
  useBaselineDiffQuery,
  useBaselineQuery,
  useBaselinesQuery,
  useEcusQuery,
  useReleaseBaselineMutation,
  useUpdateBaselineMutation,
} from '@/hooks/queries/software';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { SOFTWARE_ERROR_SENTENCES } from '@/shared/api/software-paths';
import { rangeProblem, versionProblem } from '@/shared/domain/software';
import type { Baseline, BaselineStatus, BaselineSummary, Ecu } from '@/shared/schemas/software';
import { SoftwareHeader } from './software-header';
import { formatDay, softwareCan } from './software-words';

const STATUS_WORDS: Record<BaselineStatus, { label: string; tone: BadgeTone }> = {
  draft: { label: 'Draft', tone: 'warning' },
  released: { label: 'Released', tone: 'success' },
  superseded: { label: 'Superseded', tone: 'neutral' },
};

/** Baselines per stage: open one to read its targets and rules, edit a draft, release it, compare two. */
export function BaselinesScreen() {
  const { user, currentProgramId } = useSession();
  const { isWide } = useBreakpoints();
  const list = useBaselinesQuery(currentProgramId);
  const [openId, setOpenId] = useState<string | null>(null);
  const items = list.data ?? [];
  const stages = [...new Map(items.map((b) => [b.stageId, b.stage])).entries()];

  const listView = (
    <View style={styles.gap} testID="baseline-list">
      {list.isPending && currentProgramId ? <LoadingState label="Loading baselines…" /> : null}
      {list.isError ? <ErrorState message={errorMessage(list.error)} onRetry={() => void list.refetch()} /> : null}
      {list.data && items.length === 0 ? <EmptyState title="No baselines yet" /> : null}
      {stages.map(([stageId, stage]) => (
        <View key={stageId} style={styles.gap}>
          <Heading level={2} variant="heading">
            {stage}
          </Heading>
          {items
            .filter((b) => b.stageId === stageId)
            .map((b) => (
              <Card key={b.id} style={[styles.summary, openId === b.id && styles.open]}>
                <View style={styles.flex}>
                  <Text variant="bodyStrong">
                    {b.name}
                    {b.releaseLabel ? ` · ${b.releaseLabel}` : ''}
                  </Text>
                  <Text variant="caption" tone="muted">
                    {formatDay(b.date)} · {b.targetCount} targets · {b.ruleCount} rules
                  </Text>
                </View>
                <Badge label={STATUS_WORDS[b.status].label} tone={STATUS_WORDS[b.status].tone} testID={`baseline-status-${b.id}`} />
                <Button
                  label={openId === b.id ? 'Opened' : 'Open'}
                  variant="secondary"
                  compact
                  onPress={() => setOpenId(b.id)}
                  accessibilityLabel={`Open ${b.name}`}
                  testID={`baseline-open-${b.id}`}
                />
              </Card>
            ))}
        </View>
      ))}
    </View>
  );

  const opened = items.find((b) => b.id === openId) ?? null;
  const detail = opened ? (
    <BaselineDetail
      key={opened.id}
      summary={opened}
      released={items.find((b) => b.stageId === opened.stageId && b.status === 'released' && b.id !== opened.id) ?? null}
      canEdit={softwareCan.editBaselines(user?.role)}
      programId={currentProgramId}
    />
  ) : (
    <Text tone="muted">Open a baseline to see its targets and rules.</Text>
  );

  return (
    <Screen testID="baselines-screen">
      <SoftwareHeader place="baselines" title="Baselines" />
      {isWide ? (
        <View style={styles.columns}>
          <View style={styles.column}>{listView}</View>
          <View style={styles.column}>{detail}</View>
        </View>
      ) : (
        <>
          {listView}
          {detail}
        </>
      )}
      {items.length >= 2 ? <DiffPanel baselines={items} /> : null}
    </Screen>
  );
}

function BaselineDetail({
  summary,
  released,
  canEdit,
  programId,
}: {
  summary: BaselineSummary;
  released: BaselineSummary | null;
  canEdit: boolean;
  programId: string | null;
}) {
  const baseline = useBaselineQuery(summary.id);
  const [editing, setEditing] = useState(false);
  const [confirming, setConfirming] = useState(false);
  const release = useReleaseBaselineMutation(summary.id);
  if (baseline.isPending) return <LoadingState label="Loading the baseline…" />;
  if (baseline.isError || !baseline.data) return <ErrorState message={errorMessage(baseline.error)} onRetry={() => void baseline.refetch()} />;
  const b = baseline.data;
  const draft = b.status === 'draft';

  return (
    <Card style={styles.gap} testID="baseline-detail">
      <Heading level={2} variant="heading">
        {b.name}
        {b.releaseLabel ? ` · ${b.releaseLabel}` : ''}
      </Heading>
      <Text tone="muted">
        {b.stage} · {formatDay(b.date)} · {STATUS_WORDS[b.status].label}
        {b.releasedAt ? ` ${formatDay(b.releasedAt)}${b.releasedBy ? ` by ${b.releasedBy.name}` : ''}` : ''}
      </Text>
      {b.notes ? <Text>{b.notes}</Text> : null}
      {!draft ? <Text tone="muted">Released baselines are read-only. Start a new draft to change targets.</Text> : null}
      {editing && programId ? (
        <BaselineEditor baseline={b} programId={programId} onDone={() => setEditing(false)} />
      ) : (
        <>
          <Heading level={3} variant="bodyStrong">
            Targets
          </Heading>
          {b.targets.length === 0 ? <Text tone="muted">No targets yet.</Text> : null}
          {b.targets.map((t) => (
            <View key={t.ecuId} style={styles.line} testID={`baseline-target-${t.ecuCode}`}>
              <Text variant="label" style={styles.code}>
                {t.ecuCode}
              </Text>
              <Text style={styles.flex}>{t.ecuName}</Text>
              <Text variant="bodyStrong" selectable>
                {t.version}
              </Text>
            </View>
          ))}
          <Heading level={3} variant="bodyStrong">
            Compatibility rules
          </Heading>
          {b.rules.length === 0 ? <Text tone="muted">No rules.</Text> : null}
          {b.rules.map((r) => (
            <Text key={r.id}>
              When {r.whenEcuCode} is {r.whenMinVersion} or later, {r.thenEcuCode} must be {r.range}
              {r.note ? ` (${r.note})` : ''}
            </Text>
          ))}
          {draft && canEdit ? (
            <View style={styles.actions}>
              <Button label="Edit the draft" variant="secondary" compact onPress={() => setEditing(true)} testID="baseline-edit" />
              <Button label="Release…" compact onPress={() => setConfirming(true)} testID="baseline-release" />
            </View>
          ) : null}
          {confirming ? (
            <View style={styles.gap} testID="baseline-release-confirm">
              <Notice
                tone="warning"
                message={`Released baselines are read-only; this supersedes ${released ? released.name : 'no other baseline (none is released for this stage)'}.`}
              />
              <View style={styles.actions}>
                <Button
                  label="Release it"
                  compact
                  loading={release.isPending}
                  onPress={() => release.mutate(b.version, { onSuccess: () => setConfirming(false) })}
                  testID="baseline-release-yes"
                />
                <Button label="Cancel" variant="ghost" compact onPress={() => setConfirming(false)} />
              </View>
            </View>
          ) : null}
          {release.isError ? <Notice message={errorMessage(release.error, SOFTWARE_ERROR_SENTENCES)} testID="baseline-release-error" /> : null}
        </>
      )}
    </Card>
  );
}

type RuleDraft = { whenEcuId: string; whenMinVersion: string; thenEcuId: string; range: string; note: string };

function BaselineEditor({ baseline, programId, onDone }: { baseline: Baseline; programId: string; onDone: () => void }) {
  const ecus = useEcusQuery(programId);
  const update = useUpdateBaselineMutation(baseline.id);
  const [targets, setTargets] = useState<Record<string, string>>(() => Object.fromEntries(baseline.targets.map((t) => [t.ecuId, t.version])));
  const [rules, setRules] = useState<RuleDraft[]>(() =>
    baseline.rules.map((r) => ({ whenEcuId: r.whenEcuId, whenMinVersion: r.whenMinVersion, thenEcuId: r.thenEcuId, range: r.range, note: r.note })),
  );
  const list: Ecu[] = ecus.data ?? [];
  const options = list.map((e) => ({ value: e.id, label: e.code }));

  const setRule = (i: number, change: Partial<RuleDraft>) => setRules((all) => all.map((r, j) => (j === i ? { ...r, ...change } : r)));

  const save = () => {
    update.mutate(
      {
        version: baseline.version,
        targets: Object.entries(targets)
          .filter(([, v]) => v.trim() !== '')
          .map(([ecuId, version]) => ({ ecuId, version: version.trim() })),
        rules: rules.map((r) => ({ ...r, whenMinVersion: r.whenMinVersion.trim(), range: r.range.trim() })),
      },
      { onSuccess: onDone },
    );
  };

  if (ecus.isPending) return <LoadingState label="Loading the ECUs…" />;
  return (
    <View style={styles.gap} testID="baseline-editor">
      <Heading level={3} variant="bodyStrong">
        Targets (leave empty for an ECU not in this baseline)
      </Heading>
      {list.map((ecu) => (
        <TextField
          key={ecu.id}
          label={`${ecu.code} · ${ecu.name}`}
          value={targets[ecu.id] ?? ''}
          onChangeText={(text) => setTargets((all) => ({ ...all, [ecu.id]: text }))}
          autoCapitalize="none"
          autoCorrect={false}
          testID={`baseline-target-input-${ecu.code}`}
        />
      ))}
      <Heading level={3} variant="bodyStrong">
        Compatibility rules
      </Heading>
      {rules.map((rule, i) => {
        const rangeHint = rule.range.trim() ? rangeProblem(rule.range) : null;
        const versionHint = rule.whenMinVersion.trim() ? versionProblem(rule.whenMinVersion.trim()) : null;
        return (
          <Card key={i} tone="muted" style={styles.gap} testID={`baseline-rule-${i}`}>
            <Select label="When this ECU" value={rule.whenEcuId || null} onChange={(v) => setRule(i, { whenEcuId: v })} options={options} />
            <TextField
              label="is at or above version"
              value={rule.whenMinVersion}
              onChangeText={(text) => setRule(i, { whenMinVersion: text })}
              autoCapitalize="none"
              error={versionHint ?? undefined}
              placeholder="4.2.0"
            />
            <Select label="this ECU" value={rule.thenEcuId || null} onChange={(v) => setRule(i, { thenEcuId: v })} options={options} />
            <TextField
              label="must lie within the range"
              value={rule.range}
              onChangeText={(text) => setRule(i, { range: text })}
              autoCapitalize="none"
              error={rangeHint ?? undefined}
              placeholder=">=3.1.0 <4"
              testID={`baseline-rule-${i}-range`}
            />
            <TextField label="Note" value={rule.note} onChangeText={(text) => setRule(i, { note: text })} />
            <Button label="Remove this rule" variant="danger" compact onPress={() => setRules((all) => all.filter((_, j) => j !== i))} />
          </Card>
        );
      })}
      <Button
        label="Add a rule"
        icon="plus"
        variant="secondary"
        compact
        onPress={() => setRules((all) => [...all, { whenEcuId: '', whenMinVersion: '', thenEcuId: '', range: '', note: '' }])}
        testID="baseline-rule-add"
      />
      {update.isError ? <Notice message={errorMessage(update.error, SOFTWARE_ERROR_SENTENCES)} testID="baseline-save-error" /> : null}
      <View style={styles.actions}>
        <Button label="Save the draft" compact loading={update.isPending} onPress={save} testID="baseline-save" />
        <Button label="Cancel" variant="ghost" compact onPress={onDone} />
      </View>
    </View>
  );
}

const CHANGE_WORDS = { added: 'Added', removed: 'Removed', upgraded: 'Upgraded', downgraded: 'Downgraded', changed: 'Changed', same: 'Same' } as const;

function DiffPanel({ baselines }: { baselines: BaselineSummary[] }) {
  const [fromId, setFromId] = useState<string | null>(null);
  const [toId, setToId] = useState<string | null>(null);
  const diff = useBaselineDiffQuery(fromId, toId);
  const options = baselines.map((b) => ({ value: b.id, label: `${b.name}${b.releaseLabel ? ` · ${b.releaseLabel}` : ''}` }));
  return (
    <Card style={styles.gap} testID="baseline-diff">
      <Heading level={2} variant="heading">
        Compare two baselines
      </Heading>
      <Select label="From" value={fromId} onChange={setFromId} options={options} testID="baseline-diff-from" />
      <Select label="To" value={toId} onChange={setToId} options={options} testID="baseline-diff-to" />
      {fromId && fromId === toId ? <Text tone="muted">Choose two different baselines.</Text> : null}
      {diff.isFetching && !diff.data ? <LoadingState label="Comparing…" /> : null}
      {diff.isError ? <Notice message={errorMessage(diff.error)} /> : null}
      {diff.data ? (
        <View style={styles.gap}>
          {diff.data.targets.map((t) => (
            <View key={t.ecuId} style={styles.line} testID={`diff-target-${t.ecuCode}`}>
              <Text variant="label" style={styles.code}>
                {t.ecuCode}
              </Text>
              <Text style={styles.flex}>
                {t.from ?? '—'} → {t.to ?? '—'}
              </Text>
              <Badge label={CHANGE_WORDS[t.change]} tone={t.change === 'same' ? 'neutral' : t.change === 'downgraded' || t.change === 'removed' ? 'warning' : 'primary'} />
            </View>
          ))}
          {diff.data.rules
            .filter((r) => r.change !== 'same')
            .map((r, i) => {
              const rule = r.to ?? r.from;
              return rule ? (
                <Text key={i}>
                  Rule {r.change}: when {rule.whenEcuCode} ≥ {rule.whenMinVersion}, {rule.thenEcuCode} {rule.range}
                  {r.change === 'changed' && r.from ? ` (was ${r.from.range})` : ''}
                </Text>
              ) : null;
            })}
        </View>
      ) : null}
    </Card>
  );
}

const styles = StyleSheet.create({
  gap: {
    gap: spacing.sm,
  },
  columns: {
    flexDirection: 'row',
    gap: spacing.xl,
    alignItems: 'flex-start',
  },
  column: {
    flex: 1,
    gap: spacing.md,
  },
  summary: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.sm,
  },
  open: {
    borderColor: colors.primary,
  },
  flex: {
    flex: 1,
  },
  line: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    borderBottomWidth: 1,
    borderBottomColor: colors.border,
    paddingVertical: spacing.xs,
  },
  code: {
    width: 56,
  },
  actions: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
