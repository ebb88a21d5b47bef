import { StyleSheet, View } from 'react-native';
import { LinkPressable } from '@/components/ui/link-pressable';
import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { EmptyState, ErrorState, LoadingState } from '@/components/ui/states';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { useFocusRing } from '@/components/ui/use-focus-ring';
import { colors, radii, shadows, sizes, spacing } from '@/components/theme/tokens';
import { useProgramCampaignsQuery } from '@/hooks/queries/validation';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { useSession } from '@/hooks/use-session';
import type { Campaign } from '@/shared/schemas/validation';
import { CampaignProgressSummary, hasStarted } from './campaign-summary';
import { validationErrorMessage } from './validation-words';

/** Every test campaign of the program: where each stands and when it should end. */
export function ProgramCampaignsScreen() {
  const { currentProgramId, currentProgram } = useSession();
  const { isWide } = useBreakpoints();
  const campaigns = useProgramCampaignsQuery(currentProgramId);
  const list = [...(campaigns.data ?? [])].sort((a, b) => order(a) - order(b) || a.assetTag.localeCompare(b.assetTag) || a.name.localeCompare(b.name));

  return (
    <Screen testID="campaigns-screen">
      <PageTitle title="Test campaigns" />
      <TextLink href="/validation" label="Back to the plan" />
      <View style={styles.header}>
        <Text variant="caption" tone="muted">
          {currentProgram ? `${currentProgram.code} · ` : ''}Climate-chamber runs and durability routes
        </Text>
        <Heading level={1}>Test campaigns</Heading>
        <Text tone="muted">A campaign is planned and recorded on its asset: open the asset’s campaigns to add one or record hours.</Text>
      </View>
      {!currentProgramId ? (
        <EmptyState title="No program chosen" message="Choose a program in the menu." />
      ) : campaigns.isPending ? (
        <LoadingState label="Loading campaigns…" />
      ) : campaigns.isError ? (
        <ErrorState message={validationErrorMessage(campaigns.error)} onRetry={() => void campaigns.refetch()} retrying={campaigns.isFetching} />
      ) : list.length === 0 ? (
        <EmptyState title="No campaigns yet" message="Open an asset and choose Test campaigns to plan one." />
      ) : (
        <View style={[styles.list, isWide && styles.grid]} role="list" testID="campaigns-list">
          {list.map((campaign) => (
            <View key={campaign.id} role="listitem" style={isWide && styles.cardWide}>
              <CampaignCard campaign={campaign} />
            </View>
          ))}
        </View>
      )}
    </Screen>
  );
}

/** Running campaigns first, then those not started, then the finished ones. */
const order = (campaign: Campaign) => (campaign.progress.complete ? 2 : hasStarted(campaign) ? 0 : 1);

function CampaignCard({ campaign }: { campaign: Campaign }) {
  const ring = useFocusRing();
  // The link is named by what the card shows (tag, name, progress), so the words seen are the words heard.
  return (
    <LinkPressable
      href={`/assets/${campaign.assetId}/campaigns?campaignId=${campaign.id}`}
      testID={`campaign-${campaign.id}`}
      onFocus={ring.onFocus}
      onBlur={ring.onBlur}
      style={({ pressed }) => [styles.card, pressed && styles.pressed, ring.focused && styles.focused]}
    >
      <Text variant="caption" tone="muted">
        {campaign.assetTag}
      </Text>
      <Text variant="heading">{campaign.name}</Text>
      <CampaignProgressSummary campaign={campaign} />
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.xs,
  },
  list: {
    gap: spacing.md,
  },
  grid: {
    flexDirection: 'row',
    flexWrap: 'wrap',
  },
  card: {
    flexGrow: 1,
    backgroundColor: colors.surface,
    borderRadius: radii.lg,
    borderWidth: 1,
    borderColor: colors.border,
    padding: spacing.lg,
    gap: spacing.xs,
    ...shadows.card,
  },
  cardWide: {
    flexBasis: '48%',
    flexGrow: 1,
  },
  pressed: {
    backgroundColor: colors.surfaceMuted,
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
    outlineOffset: 2,
  },
});
