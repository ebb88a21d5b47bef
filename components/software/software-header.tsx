import { StyleSheet, View } from 'react-native';
import { PageTitle } from '@/components/ui/page-title';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';
import { spacing } from '@/components/theme/tokens';
import { useSession } from '@/hooks/use-session';
import { softwareCan } from './software-words';

type Place = 'matrix' | 'import' | 'reflash' | 'baselines' | 'ecus';

const PLACES: ReadonlyArray<{ place: Place; href: string; label: string }> = [
  { place: 'matrix', href: '/software', label: 'Matrix' },
  { place: 'import', href: '/software/import', label: 'Import a read-out' },
  { place: 'reflash', href: '/software/reflash', label: 'Reflash list' },
  { place: 'baselines', href: '/software/baselines', label: 'Baselines' },
  { place: 'ecus', href: '/software/ecus', label: 'ECU catalogue' },
];

/** Title of a software page and links to its sibling pages. */
export function SoftwareHeader({ place, title, subtitle }: { place: Place; title: string; subtitle?: string }) {
  const { user, currentProgram } = useSession();
  const links = PLACES.filter((p) => p.place !== place && (p.place !== 'import' || softwareCan.recordFlash(user?.role)));
  return (
    <View style={styles.header}>
      <PageTitle title={title} />
      <Heading level={1} variant="title">
        {title}
      </Heading>
      <Text tone="muted">{subtitle ?? (currentProgram ? `${currentProgram.code} · ${currentProgram.name}` : '')}</Text>
      <View style={styles.links} role="navigation" aria-label="Software pages">
        {links.map((link) => (
          <TextLink key={link.place} href={link.href} label={link.label} testID={`software-link-${link.place}`} />
        ))}
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  header: {
    gap: spacing.xs,
  },
  links: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    columnGap: spacing.lg,
  },
});
