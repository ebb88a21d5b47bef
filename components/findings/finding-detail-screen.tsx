import { useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { PhotoCount, PhotoGrid } from '@/components/photos/photo-grid';
import { Button } from '@/components/ui/button';
import { Columns, DetailHeader, Fact as DetailFact, Section } from '@/components/ui/detail';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { formatDateTime } from '@/components/assets/asset-words';
import { spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useIsOnline } from '@/hooks/offline/use-offline-queue';
import { findingConflictCurrent, useFindingQuery, useUpdateFindingMutation } from '@/hooks/queries/findings';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import { FINDING_ERROR_SENTENCES } from '@/shared/api/finding-paths';
import { FINDING_MEMBER_ROLES, mayEditDetails, type FindingActor } from '@/shared/domain/finding-workflow';
import { SYSTEM_LABELS } from '@/shared/schemas/assets';
import type { Role } from '@/shared/schemas/auth';
import { FINDING_SEVERITY_LABELS, type Finding, type Person } from '@/shared/schemas/findings';
import { FindingComments } from './finding-comments';
import { FindingEditForm } from './finding-edit-form';
import { FindingStatusBadge, OverdueBadge, SafetyCaution, SeverityBadge } from './finding-badges';
import { FindingHistory } from './finding-history';
import { FindingPhotoAdder } from './finding-photo-adder';
import { FindingWorkflow, findingState } from './finding-workflow';
import { dueWords } from './finding-words';

export function FindingDetailScreen({ findingId }: { findingId: string }) {
  const finding = useFindingQuery(findingId);
  if (finding.isPending) {
    return (
      <Screen>
        <TextLink href="/findings" label="Back to findings" />
        {finding.isPaused ? (
          <Notice tone="warning" message="No connection. This finding shows when the connection is back." />
        ) : (
          <LoadingState label="Loading the finding…" />
        )}
      </Screen>
    );
  }
  if (finding.isError) {
    return (
      <Screen>
        <TextLink href="/findings" label="Back to findings" />
        <ErrorState message={errorMessage(finding.error)} onRetry={() => void finding.refetch()} retrying={finding.isFetching} />
      </Screen>
    );
  }
  return <FindingDetail finding={finding.data} />;
}

const isMember = (role: Role | undefined) => Boolean(role && (FINDING_MEMBER_ROLES as readonly Role[]).includes(role));

function FindingDetail({ finding }: { finding: Finding }) {
  const { user } = useSession();
  const { isWide } = useBreakpoints();
  const online = useIsOnline();
  const [editing, setEditing] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const actor: FindingActor | null = user ? { id: user.id, role: user.role } : null;
  const me: Person | null = user ? { id: user.id, name: user.name } : null;
  const member = isMember(user?.role);
  const canEdit = Boolean(actor && member && mayEditDetails(findingState(finding), actor));

  const header = (
    <DetailHeader
      eyebrow={`Finding${finding.assetTag ? ` on ${finding.assetTag}` : ''}`}
      title={finding.title}
      titleTestID="finding-title-text"
      badges={
        <>
          <SeverityBadge severity={finding.severity} testID="finding-severity-badge" />
          <FindingStatusBadge status={finding.status} />
          {finding.overdue ? <OverdueBadge testID="finding-overdue" /> : null}
        </>
      }
    >
      {member && me ? <WatchButton finding={finding} me={me} online={online} /> : null}
    </DetailHeader>
  );

  const details = editing ? (
    <FindingEditForm
      finding={finding}
      me={me}
      onDone={(message) => {
        setEditing(false);
        setNotice(message || null);
      }}
    />
  ) : (
    <Section
      title="Details"
      action={canEdit ? <Button label="Edit" variant="secondary" compact disabled={!online} onPress={() => setEditing(true)} testID="finding-edit-open" /> : null}
      testID="finding-details"
    >
      <Fact label="Asset">
        {finding.assetId ? <TextLink href={`/assets/${finding.assetId}`} label={finding.assetTag ?? 'Open the asset'} testID="finding-asset-link" /> : '—'}
      </Fact>
      <Fact label="Severity">{FINDING_SEVERITY_LABELS[finding.severity]}</Fact>
      <Fact label="System">{finding.system ? SYSTEM_LABELS[finding.system] : '—'}</Fact>
      <Fact label="Owner">{finding.owner?.name ?? 'Nobody yet'}</Fact>
      <Fact label="Watchers">{finding.watchers.length ? finding.watchers.map((person) => person.name).join(', ') : 'Nobody'}</Fact>
      <Fact label="Due">
        <Text tone={finding.overdue ? 'danger' : 'default'} weight={finding.overdue ? 'semibold' : undefined}>
          {dueWords(finding.dueDate, finding.overdue)}
        </Text>
      </Fact>
      <Fact label="Filed">{`${finding.createdBy?.name ?? 'Someone'}, ${formatDateTime(finding.createdAt)}`}</Fact>
      <Fact label="Last change">{formatDateTime(finding.updatedAt)}</Fact>
      {finding.checklistItemId && finding.assetId ? (
        <Fact label="From">
          <TextLink href={`/assets/${finding.assetId}/checklist`} label="A checklist item (open the checklist)" testID="finding-item-link" />
        </Fact>
      ) : null}
      <Fact label="Description">{finding.description || 'No description.'}</Fact>
    </Section>
  );

  const workflow = <FindingWorkflow finding={finding} actor={actor} online={online} />;

  const photos = (
    <Section title="Photos" testID="finding-photos-card">
      <PhotoCount count={finding.photos.length} />
      <PhotoGrid photos={finding.photos} label={finding.title} testID="finding-photo-grid" />
      {member ? <FindingPhotoAdder findingId={finding.id} online={online} /> : null}
    </Section>
  );

  const comments = (
    <Section title="Comments">
      <FindingComments findingId={finding.id} canComment={member} online={online} />
    </Section>
  );

  const history = (
    <Section title="History">
      <FindingHistory findingId={finding.id} />
    </Section>
  );

  return (
    <Screen testID="finding-detail">
      <PageTitle title={finding.title} />
      <View style={styles.back}>
        <TextLink href="/findings" label="Back to findings" testID="finding-back" />
        {finding.assetId ? <TextLink href={`/findings?assetId=${finding.assetId}`} label={`All findings on ${finding.assetTag ?? 'this asset'}`} /> : null}
      </View>
      {header}
      {finding.blocksDriving ? <SafetyCaution /> : null}
      {notice ? <Notice tone="success" message={notice} testID="finding-notice" /> : null}
      {!online ? (
        <Notice tone="warning" message="No connection. Comments wait on this device; status changes and edits need the connection." testID="finding-offline" />
      ) : null}
      {isWide ? (
        <Columns
          left={
            <>
              {workflow}
              {details}
              {photos}
            </>
          }
          right={
            <>
              {comments}
              {history}
            </>
          }
        />
      ) : (
        <>
          {workflow}
          {photos}
          {details}
          {comments}
          {history}
        </>
      )}
    </Screen>
  );
}

/** Watching is the person's own choice: on a conflict it is applied again on the latest watcher list, never over other changes. */
function WatchButton({ finding, me, online }: { finding: Finding; me: Person; online: boolean }) {
  const update = useUpdateFindingMutation(finding.id);
  const [error, setError] = useState<string | null>(null);
  const watching = finding.watchers.some((person) => person.id === me.id);

  const send = (base: Finding, watch: boolean, again: boolean) => {
    const ids = base.watchers.map((person) => person.id).filter((id) => id !== me.id);
    update.mutate(
      { version: base.version, watcherIds: watch ? [...ids, me.id] : ids },
      {
        onSuccess: () => setError(null),
        onError: (reason) => {
          const current = findingConflictCurrent(reason);
          if (current && !again) send(current, watch, true);
          else setError(errorMessage(reason, FINDING_ERROR_SENTENCES));
        },
      },
    );
  };

  return (
    <View style={styles.watch}>
      <Button
        label={watching ? 'Stop watching' : 'Watch'}
        variant="secondary"
        compact
        disabled={!online}
        loading={update.isPending}
        accessibilityHint={watching ? 'You stop getting e-mails about this finding' : 'You get an e-mail when its status changes'}
        onPress={() => send(finding, !watching, false)}
        testID="finding-watch"
      />
      {error ? <Notice message={error} /> : null}
    </View>
  );
}

/** A finding's facts are worth copying: their text is selectable. */
function Fact({ label, children }: { label: string; children: ReactNode }) {
  return (
    <DetailFact label={label} selectable>
      {children}
    </DetailFact>
  );
}

const styles = StyleSheet.create({
  back: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.lg,
  },
  watch: {
    gap: spacing.xs,
    paddingTop: spacing.xs,
  },
});
