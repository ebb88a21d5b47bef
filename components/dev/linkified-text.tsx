import { Link } from 'expo-router';
import { Linking, Platform, StyleSheet } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors } from '@/components/theme/tokens';

const URL_PATTERN = /https?:\/\/[^\s<>"'()[\]]+/g;
const TRAILING_PUNCTUATION = /[.,;:!?]+$/;

type Part = { kind: 'text'; value: string } | { kind: 'link'; url: string };

export function splitLinks(text: string): Part[] {
  const parts: Part[] = [];
  let last = 0;
  for (const match of text.matchAll(URL_PATTERN)) {
    const start = match.index ?? 0;
    const url = match[0].replace(TRAILING_PUNCTUATION, '');
    if (start > last) parts.push({ kind: 'text', value: text.slice(last, start) });
    parts.push({ kind: 'link', url });
    last = start + url.length;
  }
  if (last < text.length) parts.push({ kind: 'text', value: text.slice(last) });
  return parts;
}

/** A link to this same site becomes an in-app path, so it opens here without a reload. */
function sameOriginPath(url: string): string | null {
  if (Platform.OS !== 'web' || typeof window === 'undefined') return null;
  try {
    const parsed = new URL(url);
    if (parsed.origin !== window.location.origin) return null;
    return `${parsed.pathname}${parsed.search}${parsed.hash}`;
  } catch {
    return null;
  }
}

function openInThisTab(url: string) {
  if (Platform.OS === 'web' && typeof window !== 'undefined') window.location.assign(url);
  else void Linking.openURL(url);
}

/** Plain e-mail text with its web addresses made pressable; they open in the same tab. */
export function LinkifiedText({ text, testID }: { text: string; testID?: string }) {
  return (
    <Text testID={testID} selectable style={styles.body}>
      {splitLinks(text).map((part, index) => {
        if (part.kind === 'text') return part.value;
        const path = sameOriginPath(part.url);
        return path ? (
          <Link key={index} href={path} style={styles.link} testID="mail-link">
            {part.url}
          </Link>
        ) : (
          <Text key={index} accessibilityRole="link" onPress={() => openInThisTab(part.url)} style={styles.link} testID="mail-link">
            {part.url}
          </Text>
        );
      })}
    </Text>
  );
}

const styles = StyleSheet.create({
  body: {
    flexShrink: 1,
  },
  link: {
    color: colors.primary,
    textDecorationLine: 'underline',
  },
});
