import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Icon } from '@/components/ui/icon';
import { PageTitle } from '@/components/ui/page-title';
import { ProgressBar } from '@/components/ui/progress-bar';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { randomId } from '@/hooks/api/ids';
import { useAssetQuery } from '@/hooks/queries/assets';
import {
  campaignLogErrors,
  useAssetCampaignsQuery,
  useImportCampaignLogMutation,
  useRecordCampaignProgressMutation,
  type CampaignLogError,
} from '@/hooks/queries/validation';
import { useSession } from '@/hooks/use-session';
import type { Campaign, CampaignStep } from '@/shared/schemas/validation';
import { CampaignForm } from './campaign-form';
import { CampaignProgressSummary, hasStarted, stepConditions, stepPlan } from './campaign-summary';
import { CAN_PICK_DOCUMENTS, pickFile, readFileText } from './pick-file';
import { canValidation, formatAmount, readNumber, validationErrorMessage } from './validation-words';

/** The test campaigns of one asset: plan them, record hours or km per step, import a run log. */
export function AssetCampaignsScreen({ assetId, campaignId }: { assetId: string; campaignId?: string }) {
  const { user } = useSession();
  const asset = useAssetQuery(assetId);
  const campaigns = useAssetCampaignsQuery(assetId);
  const [creating, setCreating] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const canWork = canValidation.workCampaigns(user?.role);
  const tag = asset.data?.tag ?? 'this asset';
  const list = [...(campaigns.data ?? [])].sort((a, b) => (a.id === campaignId ? -1 : b.id === campaignId ? 1 : campaignOrder(a) - campaignOrder(b)));

  return (
    <Screen testID="asset-campaigns">
      <PageTitle title={`Test campaigns · ${tag}`} />
      <View style={styles.links}>
        <TextLink href={`/assets/${assetId}`} label={asset.data ? `Back to ${asset.data.tag}` : 'Back to the asset'} testID="asset-campaigns-back" />
        <TextLink href="/validation/campaigns" label="All campaigns" />
      </View>
      <View style={styles.header}>
        <View style={styles.headerText}>
          <Text variant="caption" tone="muted">
            {asset.data ? `${asset.data.tag} · ${asset.data.stage}` : ' '}
          </Text>
          <Heading level={1}>Test campaigns</Heading>
        </View>
        {canWork && !creating ? (
          <Button
            label="New campaign"
            icon="plus"
            compact
            onPress={() => {
              setNotice(null);
              setCreating(true);
            }}
            testID="campaign-new"
          />
        ) : null}
      </View>
      {asset.data && !asset.data.cleared ? (
        <Notice message="This asset has an open safety finding: do not power or run it until the finding is resolved; follow the site’s procedures." />
      ) : null}
      {notice ? <Notice tone="success" message={notice} testID="campaign-notice" /> : null}
      {creating ? (
        <CampaignForm
          assetId={assetId}
          onDone={(message) => {
            setCreating(false);
            setNotice(message);
          }}
        />
      ) : null}
      {campaigns.isPending ? (
        <LoadingState label="Loading campaigns…" />
      ) : campaigns.isError ? (
        <ErrorState message={validationErrorMessage(campaigns.error)} onRetry={() => void campaigns.refetch()} retrying={campaigns.isFetching} />
      ) : list.length === 0 && !creating ? (
        <EmptyState title={`No campaigns on ${tag} yet`} message={canWork ? 'Press New campaign to plan a climate-chamber run or a durability route.' : undefined} />
      ) : (
        list.map((campaign) => <CampaignPanel key={campaign.id} campaign={campaign} canWork={canWork} />)
      )}
    </Screen>
  );
}

/** Running campaigns first, then those not started, then the finished ones. */
function campaignOrder(campaign: Campaign): number {
  if (campaign.progress.complete) return 2;
  return hasStarted(campaign) ? 0 : 1;
}

function CampaignPanel({ campaign, canWork }: { campaign: Campaign; canWork: boolean }) {
  const [editing, setEditing] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  if (editing) {
    return (
      <CampaignForm
        assetId={campaign.assetId}
        campaign={campaign}
        onDone={(message) => {
          setEditing(false);
          setNotice(message);
        }}
      />
    );
  }
  const frost = campaign.steps.some((s) => (s.dewPointC !== null && s.dewPointC < 0) || (s.temperatureC !== null && s.temperatureC < 0));
  return (
    <Card testID={`campaign-${campaign.id}`}>
      <View style={styles.header}>
        <Heading level={2} variant="heading" style={styles.grow}>
          {campaign.name}
        </Heading>
        {canWork ? (
          <Button label="Edit" variant="secondary" compact accessibilityLabel={`Edit ${campaign.name}`} onPress={() => setEditing(true)} testID={`campaign-${campaign.id}-edit`} />
        ) : null}
      </View>
      {notice ? <Notice tone="success" message={notice} /> : null}
      <CampaignProgressSummary campaign={campaign} />
      {campaign.kind === 'durability' ? (
        <Text variant="caption" tone="muted">
          Public-road driving needs the permits and plates the local rules require.
        </Text>
      ) : null}
      <Heading level={3} variant="bodyStrong">
        Steps
      </Heading>
      <View style={styles.steps} role="list">
        {campaign.steps.map((step, index) => (
          <StepRow key={step.id} campaign={campaign} step={step} index={index} canWork={canWork} />
        ))}
      </View>
      {campaign.kind === 'climate' ? (
        <Text variant="caption" tone="muted">
          Dew points by the Magnus formula (Alduchov and Eskridge, 1996), over water.
          {frost ? ' Below 0 °C the frost point over ice differs from this value by about a degree.' : ''}
        </Text>
      ) : null}
      {canWork ? <LogImport campaign={campaign} /> : null}
    </Card>
  );
}

function StepRow({ campaign, step, index, canWork }: { campaign: Campaign; step: CampaignStep; index: number; canWork: boolean }) {
  const record = useRecordCampaignProgressMutation(campaign.id);
  const unit = campaign.progress.unit;
  const planned = (unit === 'hours' ? step.durationHours : step.distanceKm) ?? 0;
  const done = unit === 'hours' ? step.doneHours : step.doneKm;
  const [text, setText] = useState(String(done));
  const [shown, setShown] = useState(done);
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState(false);
  const current = campaign.currentStep?.id === step.id;
  const tid = `campaign-step-${step.id}`;
  if (done !== shown) {
    // A new total arrived (a log, someone else): show it.
    setShown(done);
    setText(String(done));
  }

  const save = async () => {
    setSaved(false);
    const value = readNumber(text);
    if (value === null || Number.isNaN(value) || value < 0) {
      setError(`Enter the ${unit === 'hours' ? 'hours' : 'km'} done so far on this step, as a number of 0 or more.`);
      return;
    }
    setError(null);
    try {
      await record.mutateAsync({ stepId: step.id, ...(unit === 'hours' ? { doneHours: value } : { doneKm: value }) });
      setSaved(true);
    } catch (e) {
      setError(validationErrorMessage(e));
    }
  };

  const label = unit === 'hours' ? 'Hours done' : 'Km done';
  return (
    <View style={[styles.step, current && styles.stepCurrent]} testID={tid} role="listitem">
      <View style={styles.header}>
        <Text variant="bodyStrong" style={styles.grow}>
          {index + 1}. {step.name}
        </Text>
        <Text variant="caption" tone={current ? 'primary' : 'muted'} weight="medium">
          {current ? (hasStarted(campaign) ? 'Running now' : 'Next') : done >= planned && planned > 0 ? 'Done' : 'Planned'}
        </Text>
      </View>
      <Text variant="caption">
        {stepPlan(step)}
        {stepConditions(step) ? ` · ${stepConditions(step)}` : ''}
      </Text>
      <ProgressBar
        value={planned > 0 ? done / planned : 0}
        label={`Progress of step ${step.name}`}
        caption={`${formatAmount(done, unit)} of ${formatAmount(planned, unit)}`}
        size="sm"
        testID={`${tid}-progress`}
      />
      {step.condensationRisk ? (
        <View style={styles.caution} accessibilityRole="alert" testID={`${tid}-caution`}>
          <Icon name="warning" size={sizes.iconSm} color={colors.warning} />
          <Text variant="caption" tone="warning" style={styles.grow}>
            Condensation risk. {step.condensationRisk}
          </Text>
        </View>
      ) : null}
      {canWork ? (
        <View style={styles.record}>
          <View style={styles.recordField}>
            <TextField
              label={`${label} (total)`}
              value={text}
              onChangeText={(value) => {
                setText(value);
                setSaved(false);
              }}
              inputMode="decimal"
              testID={`${tid}-done`}
            />
          </View>
          <View>
            <Button label="Record" variant="secondary" onPress={() => void save()} loading={record.isPending} accessibilityLabel={`Record ${label.toLowerCase()} on ${step.name}`} testID={`${tid}-record`} />
          </View>
        </View>
      ) : null}
      {error ? (
        <Text variant="caption" tone="danger" aria-live="polite" testID={`${tid}-error`}>
          {error}
        </Text>
      ) : null}
      {saved ? (
        <Text variant="caption" tone="success" aria-live="polite">
          Recorded.
        </Text>
      ) : null}
    </View>
  );
}

/** A run log pasted or read from a file; a log with bad rows is refused whole, with each bad line named. */
function LogImport({ campaign }: { campaign: Campaign }) {
  const importLog = useImportCampaignLogMutation(campaign.id);
  const [csv, setCsv] = useState('');
  const [key, setKey] = useState(randomId);
  const [lines, setLines] = useState<CampaignLogError[]>([]);
  const [message, setMessage] = useState<{ tone: 'danger' | 'success'; text: string } | null>(null);
  const unit = campaign.kind === 'climate' ? 'hours' : 'km';
  const example = campaign.kind === 'climate' ? `step,hours,km\n${campaign.steps[0]?.name ?? 'Damp heat'},12,` : `step,hours,km\n${campaign.steps[0]?.name ?? 'Route A'},,250`;

  const change = (text: string) => {
    setCsv(text);
    // Another text is another request: it gets its own Idempotency-Key.
    setKey(randomId());
    setMessage(null);
  };

  const chooseFile = async () => {
    setMessage(null);
    try {
      const file = await pickFile('.csv,text/csv,text/plain');
      if (file) change(await readFileText(file));
    } catch {
      setMessage({ tone: 'danger', text: 'The file could not be read. Paste the log instead.' });
    }
  };

  const submit = async () => {
    setLines([]);
    setMessage(null);
    if (!csv.trim()) {
      setMessage({ tone: 'danger', text: 'Paste a log or choose a CSV file first.' });
      return;
    }
    try {
      await importLog.mutateAsync({ csv, idempotencyKey: key });
      setCsv('');
      setKey(randomId());
      setMessage({ tone: 'success', text: 'Log imported: the steps show the new totals.' });
    } catch (error) {
      const bad = campaignLogErrors(error);
      setLines(bad);
      setMessage({ tone: 'danger', text: bad.length ? `${bad.length === 1 ? 'One row' : `${bad.length} rows`} could not be read, so nothing was recorded. Correct ${bad.length === 1 ? 'it' : 'them'} and import again.` : validationErrorMessage(error) });
    }
  };

  return (
    <View style={styles.log}>
      <Heading level={3} variant="bodyStrong">
        Import a run log
      </Heading>
      <Text variant="caption" tone="muted">
        CSV, one row per run: step name, hours, km (a header row is allowed). Each row adds to that step’s {unit} done.
      </Text>
      <TextField
        label="Log (CSV)"
        value={csv}
        onChangeText={change}
        multiline
        numberOfLines={5}
        placeholder={example}
        autoCapitalize="none"
        autoCorrect={false}
        testID="campaign-log-input"
      />
      <View style={styles.buttons}>
        <Button label="Import log" onPress={() => void submit()} loading={importLog.isPending} testID="campaign-log-submit" />
        {CAN_PICK_DOCUMENTS ? <Button label="Choose a CSV file" variant="secondary" onPress={() => void chooseFile()} testID="campaign-log-file" /> : null}
      </View>
      {message ? <Notice tone={message.tone} message={message.text} testID={message.tone === 'success' ? 'campaign-log-done' : undefined} /> : null}
      {lines.length ? (
        <View style={styles.errors} testID="campaign-log-errors" role="list" aria-label="Rows that could not be read">
          {lines.map((l) => (
            <Text key={`${l.line}-${l.message}`} variant="caption" tone="danger" role="listitem">
              Line {l.line}: {l.message}
            </Text>
          ))}
        </View>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  links: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    columnGap: spacing.xl,
  },
  header: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: spacing.sm,
  },
  grow: {
    flex: 1,
    minWidth: 0,
  },
  headerText: {
    flexGrow: 1,
    flexShrink: 1,
    minWidth: 200,
  },
  steps: {
    gap: spacing.sm,
  },
  step: {
    gap: spacing.xs,
    padding: spacing.md,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
    backgroundColor: colors.surface,
  },
  stepCurrent: {
    borderColor: colors.primary,
    borderWidth: 2,
  },
  caution: {
    flexDirection: 'row',
    gap: spacing.xs,
    alignItems: 'flex-start',
    padding: spacing.sm,
    borderRadius: radii.sm,
    backgroundColor: colors.warningTint,
  },
  record: {
    flexDirection: 'row',
    alignItems: 'flex-end',
    gap: spacing.sm,
  },
  recordField: {
    flex: 1,
    minWidth: 0,
    maxWidth: 320,
  },
  log: {
    gap: spacing.sm,
    paddingTop: spacing.md,
    borderTopWidth: 1,
    borderTopColor: colors.border,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  errors: {
    gap: spacing.xxs,
    padding: spacing.sm,
    borderRadius: radii.sm,
    borderWidth: 1,
    borderColor: colors.danger,
    backgroundColor: colors.dangerTint,
  },
});
