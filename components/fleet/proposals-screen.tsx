import { useMemo, useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Checkbox } from '@/components/ui/checkbox';
import { Screen } from '@/components/ui/screen';
import { Select } from '@/components/ui/select';
import { Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { RequireRole } from '@/components/shell/require-role';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { fieldErrors } from '@/hooks/api/api-client';
import { useAssetListQuery } from '@/hooks/queries/assets';
import { useAcceptProposalMutation, useProposalMutation } from '@/hooks/queries/fleet';
import { useStagesQuery } from '@/hooks/queries/stages';
import { useSession } from '@/hooks/use-session';
import {
  ASSIGNMENT_PURPOSES,
  ASSIGNMENT_PURPOSE_LABELS,
  PROPOSAL_MAX_REQUESTS,
  windowProblem,
  type AssignmentPurpose,
  type Proposal,
  type ProposalRequest,
} from '@/shared/schemas/fleet';
import { DateTimeField } from '@/components/ui/date-field';
import { FleetHeader } from './fleet-header';
import { addDays, formatWindow, fromLocalInput, startOfDay, toLocalInput, zoneName } from './fleet-time';
import { fleetErrorMessage } from './fleet-words';

type Need = 'any' | 'stage' | 'vehicle';
type Draft = { key: number; purpose: AssignmentPurpose; start: string; end: string; need: Need; stageId: string | null; assetId: string | null; notes: string };
type Checked = { request?: string; end?: string; start?: string; target?: string };

const NEED_LABELS: Record<Need, string> = { any: 'Any vehicle', stage: 'A vehicle of a stage', vehicle: 'One vehicle' };

function tomorrowWindow(): { start: string; end: string } {
  const day = addDays(startOfDay(new Date()), 1);
  return { start: toLocalInput(new Date(day.getFullYear(), day.getMonth(), day.getDate(), 8)), end: toLocalInput(new Date(day.getFullYear(), day.getMonth(), day.getDate(), 17)) };
}

let nextKey = 1;
function newDraft(from?: Draft): Draft {
  const span = from ? { start: from.start, end: from.end } : tomorrowWindow();
  return { key: nextKey++, purpose: from?.purpose ?? 'durability-route', ...span, need: 'any', stageId: null, assetId: null, notes: '' };
}

/** A draft as the API takes it, or what is wrong with it. */
function toRequest(d: Draft): { request?: ProposalRequest; errors: Checked } {
  const errors: Checked = {};
  const startsAt = fromLocalInput(d.start);
  const endsAt = fromLocalInput(d.end);
  if (!startsAt) errors.start = 'Use a date and time like 2026-12-03 08:00.';
  if (!endsAt) errors.end = 'Use a date and time like 2026-12-03 17:00.';
  if (startsAt && endsAt) {
    const problem = windowProblem(startsAt, endsAt);
    if (problem) errors.end = problem;
  }
  if (d.need === 'stage' && !d.stageId) errors.target = 'Choose the stage.';
  if (d.need === 'vehicle' && !d.assetId) errors.target = 'Choose the vehicle.';
  if (Object.keys(errors).length || !startsAt || !endsAt) return { errors };
  return {
    errors,
    request: {
      purpose: d.purpose,
      startsAt,
      endsAt,
      ...(d.need === 'stage' && d.stageId ? { stageId: d.stageId } : {}),
      ...(d.need === 'vehicle' && d.assetId ? { assetId: d.assetId } : {}),
      ...(d.notes.trim() ? { notes: d.notes.trim() } : {}),
    },
  };
}

export function ProposalsScreen() {
  return (
    <RequireRole roles={['coordinator', 'lead']}>
      <Proposals />
    </RequireRole>
  );
}

function Proposals() {
  const { currentProgramId } = useSession();
  const [drafts, setDrafts] = useState<Draft[]>(() => [newDraft()]);
  const [errors, setErrors] = useState<Record<number, Checked>>({});
  const [proposal, setProposal] = useState<Proposal | null>(null);
  const [chosen, setChosen] = useState<ReadonlySet<number>>(new Set());
  const [failure, setFailure] = useState<string | null>(null);
  const stages = useStagesQuery(currentProgramId);
  const vehicles = useAssetListQuery(currentProgramId ? { programId: currentProgramId, kind: 'vehicle', sort: 'tag', dir: 'asc' } : null);
  const vehicleItems = useMemo(() => (vehicles.data?.pages.flatMap((p) => p.items) ?? []).filter((v) => v.status !== 'retired'), [vehicles.data]);
  const propose = useProposalMutation();
  const accept = useAcceptProposalMutation();

  const patch = (key: number, change: Partial<Draft>) => {
    setDrafts((list) => list.map((d) => (d.key === key ? { ...d, ...change } : d)));
    setProposal(null);
    accept.reset();
  };

  const run = () => {
    setFailure(null);
    accept.reset();
    const checked = drafts.map(toRequest);
    const found: Record<number, Checked> = {};
    checked.forEach((c, i) => {
      if (Object.keys(c.errors).length) found[drafts[i].key] = c.errors;
    });
    setErrors(found);
    const bad = drafts.flatMap((d, i) => (found[d.key] ? [i + 1] : []));
    if (bad.length) setFailure(`${bad.length === 1 ? 'Request' : 'Requests'} ${bad.join(', ')} ${bad.length === 1 ? 'needs' : 'need'} attention: see the messages above.`);
    if (bad.length || !currentProgramId) return;
    propose.mutate(
      { programId: currentProgramId, requests: checked.map((c) => c.request as ProposalRequest) },
      {
        onSuccess: (result) => {
          setProposal(result);
          setChosen(new Set(result.pairs.map((_, i) => i)));
        },
        onError: (error) => {
          const fields = fieldErrors(error);
          setFailure(Object.keys(fields).length ? Object.values(fields).join(' ') : fleetErrorMessage(error));
        },
      },
    );
  };

  const acceptChosen = () => {
    if (!proposal || !currentProgramId) return;
    const pairs = proposal.pairs.filter((_, i) => chosen.has(i));
    accept.mutate({
      programId: currentProgramId,
      pairs: pairs.map((p) => ({ assetId: p.assetId, driverId: p.driver.id, startsAt: p.startsAt, endsAt: p.endsAt, purpose: p.purpose, notes: p.notes })),
    });
  };
  const acceptedPairs = proposal ? proposal.pairs.filter((_, i) => chosen.has(i)) : [];

  return (
    <Screen testID="fleet-proposals">
      <FleetHeader title="Proposals" />
      <Text tone="muted">
        Enter what needs driving; Proofyard matches eligible drivers to vehicles at the lowest total cost and explains each choice. Nothing is booked until you accept. Times are in
        this device’s time zone ({zoneName()}).
      </Text>

      {drafts.map((d, index) => (
        <Card key={d.key} testID={`proposal-request-${index}`}>
          <View style={styles.requestHead}>
            <Heading level={2} variant="heading" style={styles.flex}>
              Request {index + 1}
            </Heading>
            {drafts.length > 1 ? (
              <Button
                label="Remove"
                variant="ghost"
                compact
                accessibilityLabel={`Remove request ${index + 1}`}
                onPress={() => {
                  setDrafts((list) => list.filter((x) => x.key !== d.key));
                  setProposal(null);
                }}
                testID={`proposal-request-remove-${index}`}
              />
            ) : null}
          </View>
          <Select
            label="Purpose"
            options={ASSIGNMENT_PURPOSES.map((p) => ({ value: p, label: ASSIGNMENT_PURPOSE_LABELS[p] }))}
            value={d.purpose}
            onChange={(purpose) => patch(d.key, { purpose })}
            testID={`proposal-purpose-${index}`}
          />
          <View style={styles.window}>
            <View style={styles.windowField}>
              <DateTimeField label="Starts" value={d.start} onChange={(start) => patch(d.key, { start })} error={errors[d.key]?.start} testID={`proposal-start-${index}`} />
            </View>
            <View style={styles.windowField}>
              <DateTimeField label="Ends" value={d.end} onChange={(end) => patch(d.key, { end })} error={errors[d.key]?.end} testID={`proposal-end-${index}`} />
            </View>
          </View>
          <Select
            label="Needs"
            options={(Object.keys(NEED_LABELS) as Need[]).map((n) => ({ value: n, label: NEED_LABELS[n] }))}
            value={d.need}
            onChange={(need) => patch(d.key, { need })}
            testID={`proposal-need-${index}`}
          />
          {d.need === 'stage' ? (
            <Select
              label="Stage"
              options={(stages.data ?? []).filter((s) => !s.retired).map((s) => ({ value: s.id, label: s.name, description: `needs level ${s.minDriverLevel}` }))}
              value={d.stageId}
              onChange={(stageId) => patch(d.key, { stageId })}
              error={errors[d.key]?.target}
              testID={`proposal-stage-${index}`}
            />
          ) : null}
          {d.need === 'vehicle' ? (
            <Select
              label="Vehicle"
              options={vehicleItems.map((v) => ({ value: v.id, label: v.tag, description: v.stage }))}
              value={d.assetId}
              onChange={(assetId) => patch(d.key, { assetId })}
              error={errors[d.key]?.target}
              testID={`proposal-vehicle-${index}`}
            />
          ) : null}
          <TextField label="Notes (optional)" value={d.notes} onChangeText={(notes) => patch(d.key, { notes })} testID={`proposal-notes-${index}`} />
        </Card>
      ))}

      <View style={styles.buttons}>
        <Button
          label="Add a request"
          icon="plus"
          variant="secondary"
          disabled={drafts.length >= PROPOSAL_MAX_REQUESTS}
          onPress={() => {
            setDrafts((list) => [...list, newDraft(list[list.length - 1])]);
            setProposal(null);
          }}
          testID="proposal-request-add"
        />
        <Button label="Propose" icon="check" loading={propose.isPending} onPress={run} testID="proposal-run" />
      </View>
      {failure ? <Notice message={failure} testID="proposal-error" /> : null}

      {proposal ? (
        <Card testID="proposal-result">
          <Heading level={2} variant="heading">
            Proposal
          </Heading>
          <Text variant="caption" tone="muted">
            {proposal.costModel}
          </Text>
          {proposal.pairs.length === 0 ? <Notice tone="warning" message="No request could be filled; see the reasons below." /> : null}
          <View style={styles.pairs} role="list">
            {proposal.pairs.map((pair, i) => (
              <View key={`${pair.request}-${pair.assetId}`} role="listitem" style={styles.pair} testID={`proposal-pair-${i}`}>
                <Checkbox
                  label={`Request ${pair.request + 1}: ${pair.assetTag} with ${pair.driver.name}`}
                  description={`${ASSIGNMENT_PURPOSE_LABELS[pair.purpose]} · ${formatWindow(pair.startsAt, pair.endsAt)} · cost ${pair.cost}`}
                  checked={chosen.has(i)}
                  onChange={(on) =>
                    setChosen((set) => {
                      const next = new Set(set);
                      if (on) next.add(i);
                      else next.delete(i);
                      return next;
                    })
                  }
                  testID={`proposal-pair-${i}-choose`}
                />
                <Text tone="muted">{pair.explanation}</Text>
              </View>
            ))}
          </View>
          {proposal.unfilled.length ? (
            <View style={styles.pairs} testID="proposal-unfilled">
              <Heading level={3} variant="bodyStrong">
                Not filled
              </Heading>
              {proposal.unfilled.map((u) => (
                <View key={u.request} style={styles.unfilled}>
                  <Text variant="label">Request {u.request + 1}</Text>
                  {u.reasons.map((reason) => (
                    <Text key={reason}>{reason}</Text>
                  ))}
                </View>
              ))}
            </View>
          ) : null}
          <Text variant="caption" tone="muted">
            Total cost {proposal.totalCost}.
          </Text>
          {proposal.pairs.length ? (
            <Button
              label={acceptedPairs.length === proposal.pairs.length ? 'Book all' : `Book the ${acceptedPairs.length} chosen`}
              icon="check"
              disabled={acceptedPairs.length === 0 || accept.isSuccess}
              loading={accept.isPending}
              onPress={acceptChosen}
              testID="proposal-accept"
            />
          ) : null}
          {accept.isError ? <Notice message={fleetErrorMessage(accept.error)} testID="proposal-accept-error" /> : null}
          {accept.data ? (
            <View style={styles.pairs} testID="proposal-accepted">
              {accept.data.created.length ? (
                <Notice tone="success" message={`Booked ${accept.data.created.length === 1 ? '1 assignment' : `${accept.data.created.length} assignments`}. The drivers get an e-mail.`} />
              ) : null}
              {accept.data.created.map((a) => (
                <TextLink key={a.id} href={`/fleet/assignments/${a.id}`} label={`${a.assetTag} with ${a.driver.name}, ${formatWindow(a.startsAt, a.endsAt)}`} />
              ))}
              {accept.data.refused.map((r) => {
                const pair = acceptedPairs[r.pair];
                const reasons = (r.error.details as { reasons?: Array<{ message: string }> } | undefined)?.reasons;
                return (
                  <Notice
                    key={r.pair}
                    message={`${pair ? `${pair.assetTag} with ${pair.driver.name}: ` : ''}${reasons?.length ? reasons.map((x) => x.message).join(' ') : r.error.message}`}
                  />
                );
              })}
            </View>
          ) : null}
        </Card>
      ) : null}
    </Screen>
  );
}

const styles = StyleSheet.create({
  requestHead: {
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
  },
  flex: {
    flex: 1,
  },
  window: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  windowField: {
    flexGrow: 1,
    flexBasis: 220,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
  pairs: {
    gap: spacing.sm,
  },
  pair: {
    gap: spacing.xs,
    padding: spacing.sm,
    borderRadius: radii.md,
    borderWidth: 1,
    borderColor: colors.border,
  },
  unfilled: {
    gap: spacing.xxs,
    padding: spacing.sm,
    borderRadius: radii.md,
    backgroundColor: colors.warningTint,
  },
});
