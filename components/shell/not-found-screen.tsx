import { PageTitle } from '@/components/ui/page-title';
import { Screen } from '@/components/ui/screen';
import { Heading, Text } from '@/components/ui/text';
import { TextLink } from '@/components/ui/text-link';

export function NotFoundScreen() {
  return (
    <Screen narrow safeTop main testID="not-found">
      <PageTitle title="Page not found" />
      <Heading level={1} variant="title">
        This page does not exist
      </Heading>
      <Text tone="muted">The address may be mistyped, or the page has moved.</Text>
      <TextLink href="/" label="Go to Home" />
    </Screen>
  );
}
