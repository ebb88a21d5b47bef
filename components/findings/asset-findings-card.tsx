import { useRouter } from 'expo-router';
import { StyleSheet, View } from 'react-native';
import { Button } from '@/components/ui/button';
import { Card } from '@/components/ui/card';
import { LinkPressable } from '@/components/ui/link-pressable';
import { ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, sizes, spacing } from '@/components/theme/tokens';
import { errorMessage } from '@/hooks/api/api-client';
import { useFindingListQuery } from '@/hooks/queries/findings';
import { useSession } from '@/hooks/use-session';
import { FINDING_MEMBER_ROLES } from '@/shared/domain/finding-workflow';
import { FINDING_SEVERITIES, type Finding } from '@/shared/schemas/findings';
import { FindingStatusBadge, SeverityBadge } from './finding-badges';
import { dueWords } from './finding-words';

const SHOWN = 5;

/** On the asset page: "File a finding", the open findings (most urgent first) and the link to all of them. */
export function AssetFindingsCard({ assetId, programId }: { assetId: string; programId: string }) {
  const router = useRouter();
  const { user } = useSession();
  const list = useFindingListQuery({ programId, assetId, status: 'active', sort: 'due', dir: 'asc' });
  const first = list.data?.pages[0];
  const open = first ? FINDING_SEVERITIES.reduce((sum, severity) => sum + first.counts[severity], 0) : null;
  const canFile = Boolean(user && (FINDING_MEMBER_ROLES as readonly string[]).includes(user.role));
  const shown = first ? [...first.items].sort((a, b) => FINDING_SEVERITIES.indexOf(a.severity) - FINDING_SEVERITIES.indexOf(b.severity)).slice(0, SHOWN) : [];

  return (
    <Card testID="asset-findings">
      <View style={styles.head}>
        <Heading level={2} variant="heading">
          Findings
        </Heading>
        {canFile ? (
          <Button
            label="File a finding"
            icon="camera"
            compact
            onPress={() => router.push(`/findings/new?assetId=${assetId}`)}
            testID="asset-file-finding"
          />
        ) : null}
      </View>
      {list.isPending ? (
        list.isPaused ? (
          <Text tone="muted">The findings show when the connection is back. You can still file one.</Text>
        ) : (
          <LoadingState label="Loading findings…" />
        )
      ) : list.isError ? (
        <ErrorState message={errorMessage(list.error)} onRetry={() => void list.refetch()} />
      ) : (
        <>
          {shown.length === 0 ? <Text tone="muted">No open finding on this asset.</Text> : null}
          {shown.map((finding) => (
            <FindingLine key={finding.id} finding={finding} />
          ))}
          <TextLink
            href={`/findings?assetId=${assetId}`}
            label={`Findings on this asset (${open ?? 0} open)`}
            testID="asset-findings-link"
          />
        </>
      )}
    </Card>
  );
}

function FindingLine({ finding }: { finding: Finding }) {
  const ring = useFocusRing();
  return (
    <LinkPressable
      href={`/findings/${finding.id}`}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      testID={`asset-finding-${finding.id}`}
      style={({ pressed }) => [styles.line, pressed && styles.pressed, ring.focused && styles.focused]}
    >
      <Text variant="bodyStrong" numberOfLines={2}>
        {finding.title}
      </Text>
      <View style={styles.badges}>
        <SeverityBadge severity={finding.severity} />
        <FindingStatusBadge status={finding.status} />
        <Text variant="caption" tone={finding.overdue ? 'danger' : 'muted'}>
          {dueWords(finding.dueDate, finding.overdue)}
        </Text>
      </View>
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  head: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    flexWrap: 'wrap',
    gap: spacing.md,
  },
  line: {
    minHeight: sizes.touch,
    gap: spacing.xxs,
    paddingVertical: spacing.sm,
    paddingHorizontal: spacing.xs,
    borderTopWidth: 1,
    borderTopColor: colors.border,
    borderRadius: radii.sm,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    alignItems: 'center',
    gap: spacing.xs,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
  },
});
