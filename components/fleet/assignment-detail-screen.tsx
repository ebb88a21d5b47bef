import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { formatDateTime, formatKm, NOT_CLEARED_CAUTION, STATUS_TONES } from '@/components/assets/asset-words';
import { PhotoGrid } from '@/components/photos/photo-grid';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { Badge } from '@/components/ui/chip';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { ErrorState, LoadingState, Notice } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { useAssignmentHistoryQuery, useAssignmentQuery, useCancelAssignmentMutation } from '@/hooks/queries/fleet';
import { useSession } from '@/hooks/use-session';
import { ASSET_STATUS_LABELS } from '@/shared/schemas/assets';
import { ASSIGNMENT_STATUS_LABELS, type Assignment } from '@/shared/schemas/fleet';
import { ChangeAssignmentForm } from './change-assignment-form';
import { CheckInForm, CheckOutForm } from './check-forms';
import { RoadCaution } from './fleet-header';
import { formatDayTime, formatDuration, formatWindow, HOUR_MS, zoneName } from './fleet-time';
import { ASSIGNMENT_STATUS_TONES, fleetErrorMessage, isFleetManager, purposeLabel } from './fleet-words';

/** A check-out may come this long before the window starts (the server's EARLY_CHECKOUT_HOURS). */
const EARLY_HOURS = 12;

export function AssignmentDetailScreen({ assignmentId, booked = false }: { assignmentId: string; booked?: boolean }) {
  const query = useAssignmentQuery(assignmentId);
  if (query.isPending) {
    return (
      <Screen>
        <LoadingState label="Loading the assignment…" />
      </Screen>
    );
  }
  if (query.isError) {
    return (
      <Screen>
        <TextLink href="/fleet" label="Back to the fleet" />
        <ErrorState message={fleetErrorMessage(query.error)} onRetry={() => void query.refetch()} retrying={query.isFetching} testID="assignment-error" />
      </Screen>
    );
  }
  return <AssignmentDetail assignment={query.data} booked={booked} />;
}

function AssignmentDetail({ assignment: a, booked }: { assignment: Assignment; booked: boolean }) {
  const { user } = useSession();
  const manager = isFleetManager(user?.role);
  const mine = user?.id === a.driver.id;
  const mayHandle = manager || mine;
  const [notice, setNotice] = useState<string | null>(booked ? 'Booked. The driver gets an e-mail with the booking.' : null);
  const [changing, setChanging] = useState(false);
  const [cancelling, setCancelling] = useState(false);
  const now = Date.now();
  const start = Date.parse(a.startsAt);
  const end = Date.parse(a.endsAt);
  const opensAt = start - EARLY_HOURS * HOUR_MS;
  const blocked = !a.vehicle.cleared || a.vehicle.status === 'down' || a.vehicle.status === 'retired';
  const title = `${a.assetTag} · ${purposeLabel(a)}`;

  return (
    <Screen testID="assignment-detail">
      <PageTitle title={title} />
      <TextLink href={user?.role === 'driver' ? '/fleet/mine' : '/fleet'} label={user?.role === 'driver' ? 'Back to my drives' : 'Back to the fleet plan'} />
      <View style={styles.header}>
        <Heading level={1} variant="title">
          {title}
        </Heading>
        <View style={styles.badges}>
          <Badge label={ASSIGNMENT_STATUS_LABELS[a.status]} tone={ASSIGNMENT_STATUS_TONES[a.status]} testID="assignment-status" />
          {a.overdueReturn ? <Badge label="Overdue return" tone="danger" testID="assignment-overdue" /> : null}
        </View>
        <Text tone="muted">
          {a.driver.name} · {formatWindow(a.startsAt, a.endsAt)}
        </Text>
      </View>
      {notice ? <Notice tone="success" message={notice} testID="assignment-notice" /> : null}

      {manager && (a.status === 'planned' || a.status === 'checked-out') ? (
        changing ? (
          <ChangeAssignmentForm
            key={a.id}
            assignment={a}
            onDone={(message) => {
              setChanging(false);
              setNotice(message || null);
            }}
          />
        ) : cancelling && a.status === 'planned' ? (
          <CancelAssignment
            assignment={a}
            onClose={(message) => {
              setCancelling(false);
              setNotice(message);
            }}
          />
        ) : (
          <View style={styles.buttons}>
            <Button
              label="Change"
              variant="secondary"
              onPress={() => {
                setNotice(null);
                setChanging(true);
              }}
              testID="assignment-change-open"
            />
            {a.status === 'planned' ? (
              <Button
                label="Cancel assignment"
                variant="danger"
                onPress={() => {
                  setNotice(null);
                  setCancelling(true);
                }}
                testID="assignment-cancel-open"
              />
            ) : null}
          </View>
        )
      ) : null}


      {a.status === 'planned' || a.status === 'checked-out' ? (
        <Card testID="assignment-vehicle">
          <Heading level={2} variant="heading">
            {a.status === 'planned' ? 'Before you take it' : 'The vehicle'}
          </Heading>
          <View style={styles.badges}>
            <Badge label={ASSET_STATUS_LABELS[a.vehicle.status]} tone={STATUS_TONES[a.vehicle.status]} />
            <Badge label={a.vehicle.cleared ? 'Cleared' : 'Not cleared'} tone={a.vehicle.cleared ? 'success' : 'danger'} testID="assignment-cleared" />
          </View>
          <Text>
            {a.vehicle.stage} · needs driving level {a.vehicle.minDriverLevel} · odometer {formatKm(a.vehicle.odometerKm)}
          </Text>
          {!a.vehicle.cleared ? (
            <Notice
              message={`Do not take this vehicle. It is not cleared: ${a.vehicle.notClearedReason?.trim() || 'an open safety finding'}. ${NOT_CLEARED_CAUTION}`}
              testID="assignment-not-cleared"
            />
          ) : null}
          {a.vehicle.status === 'down' || a.vehicle.status === 'retired' ? (
            <Notice message={`The vehicle is ${ASSET_STATUS_LABELS[a.vehicle.status].toLowerCase()}: do not take it; ask the coordinator.`} />
          ) : null}
          <RoadCaution />
          <TextLink href={`/assets/${a.assetId}`} label={`Open ${a.assetTag}`} />
        </Card>
      ) : null}

      {a.status === 'planned' && mayHandle ? (
        blocked ? null : now < opensAt ? (
          <Notice tone="warning" message={`Check-out opens ${formatDayTime(new Date(opensAt))}, ${EARLY_HOURS} hours before the window starts.`} testID="checkout-not-yet" />
        ) : now >= end ? (
          <Notice tone="warning" message="The window of this assignment has passed; ask the coordinator to change it." testID="checkout-passed" />
        ) : (
          <CheckOutForm key={a.version} assignment={a} onDone={setNotice} />
        )
      ) : null}
      {a.status === 'checked-out' && mayHandle ? <CheckInForm key={a.version} assignment={a} onDone={setNotice} /> : null}

      {a.checkin?.findingId ? (
        <Notice tone="warning" message="The damage notes were filed as a finding on the vehicle." testID="checkin-finding" />
      ) : null}
      {a.checkin?.findingId ? <TextLink href={`/findings/${a.checkin.findingId}`} label="Open the damage finding" testID="checkin-finding-link" /> : null}

      <Card testID="assignment-facts">
        <Heading level={2} variant="heading">
          Details
        </Heading>
        <Fact label="Window" value={`${formatWindow(a.startsAt, a.endsAt)} (${formatDuration(end - start)}, ${zoneName(new Date(start))})`} />
        <Fact label="Driver" value={a.driver.name} />
        <Fact label="Purpose" value={purposeLabel(a)} />
        <Fact label="Vehicle" value={`${a.assetTag} · ${a.vehicle.stage}`} />
        {a.notes ? <Fact label="Notes" value={a.notes} /> : null}
        {a.levelOverrideReason ? <Fact label="Level rule overridden" value={a.levelOverrideReason} /> : null}
        {a.cancelReason ? <Fact label="Cancelled because" value={a.cancelReason} /> : null}
        {a.createdBy ? <Fact label="Booked by" value={`${a.createdBy.name}, ${formatDateTime(a.createdAt)}`} /> : null}
      </Card>

      {a.checkout ? <CheckRecord title="Checked out" check={a.checkout} testID="assignment-checkout" /> : null}
      {a.checkin ? (
        <CheckRecord
          title="Checked in"
          check={a.checkin}
          extra={[
            ...(a.checkout ? [{ label: 'Driven', value: formatKm(Math.max(0, a.checkin.odometerKm - a.checkout.odometerKm)) }] : []),
            ...(a.checkin.damageNotes ? [{ label: 'Damage', value: a.checkin.damageNotes }] : []),
          ]}
          testID="assignment-checkin"
        />
      ) : null}

      <History id={a.id} />
    </Screen>
  );
}

function Fact({ label, value }: { label: string; value: string }) {
  return (
    <View style={styles.fact}>
      <Text variant="label" tone="muted">
        {label}
      </Text>
      <Text>{value}</Text>
    </View>
  );
}

function CheckRecord({
  title,
  check,
  extra = [],
  testID,
}: {
  title: string;
  check: NonNullable<Assignment['checkout']>;
  extra?: Array<{ label: string; value: string }>;
  testID: string;
}) {
  return (
    <Card testID={testID}>
      <Heading level={2} variant="heading">
        {title}
      </Heading>
      <Fact label="When" value={`${formatDateTime(check.at)}${check.by ? `, by ${check.by.name}` : ''}`} />
      <Fact label="Odometer" value={formatKm(check.odometerKm)} />
      <Fact label="Charge" value={`${check.chargePercent} %`} />
      {extra.map((item) => (
        <Fact key={item.label} label={item.label} value={item.value} />
      ))}
      {check.notes ? <Fact label="Notes" value={check.notes} /> : null}
      <PhotoGrid photos={check.photos} label={`${title} photos`} />
    </Card>
  );
}

function CancelAssignment({ assignment, onClose }: { assignment: Assignment; onClose: (message: string | null) => void }) {
  const [reason, setReason] = useState('');
  const cancel = useCancelAssignmentMutation(assignment.id);
  return (
    <Card testID="assignment-cancel">
      <Heading level={2} variant="heading">
        Cancel this assignment?
      </Heading>
      <Text tone="muted">The driver gets an e-mail. A cancelled assignment cannot be brought back; book again instead.</Text>
      <TextField label="Reason (optional)" value={reason} onChangeText={setReason} multiline testID="assignment-cancel-reason" />
      {cancel.isError ? <Notice message={fleetErrorMessage(cancel.error)} testID="assignment-cancel-error" /> : null}
      <View style={styles.buttons}>
        <Button
          label="Cancel assignment"
          variant="danger"
          loading={cancel.isPending}
          onPress={() =>
            cancel.mutate(
              { version: assignment.version, ...(reason.trim() ? { reason: reason.trim() } : {}) },
              { onSuccess: () => onClose('Cancelled. The driver gets an e-mail.') },
            )
          }
          testID="assignment-cancel-confirm"
        />
        <Button label="Keep it" variant="ghost" onPress={() => onClose(null)} />
      </View>
    </Card>
  );
}

const ACTION_WORDS: Record<string, string> = {
  created: 'Booked',
  updated: 'Changed',
  cancelled: 'Cancelled',
  'checked-out': 'Checked out',
  'checked-in': 'Checked in',
};

function History({ id }: { id: string }) {
  const history = useAssignmentHistoryQuery(id);
  if (!history.data?.length) return null;
  return (
    <Card testID="assignment-history">
      <Heading level={2} variant="heading">
        History
      </Heading>
      {history.data.map((entry) => (
        <View key={entry.id} style={styles.fact}>
          <Text variant="label">
            {ACTION_WORDS[entry.action] ?? entry.action} · {formatDateTime(entry.at)}
            {entry.actor ? ` · ${entry.actor.name}` : ''}
          </Text>
          {entry.note ? <Text tone="muted">{entry.note}</Text> : null}
        </View>
      ))}
    </Card>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.sm,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  fact: {
    gap: spacing.xxs,
  },
  buttons: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.sm,
  },
});
