import { StyleSheet } from 'react-native';
import { colors, radii, sizes } from '@/components/theme/tokens';
import { LinkPressable } from './link-pressable';
import { Text } from './text';
import { useFocusRing } from './use-focus-ring';

/** An in-app link set as underlined text, with a 44 px tall hit area. */
export function TextLink({ href, label, testID }: { href: string; label: string; testID?: string }) {
  const { focused, onFocus, onBlur } = useFocusRing();
  return (
    <LinkPressable href={href} testID={testID} onFocus={onFocus} onBlur={onBlur} style={[styles.link, focused && styles.focused]}>
      <Text variant="bodyStrong" tone="primary" style={styles.text}>
        {label}
      </Text>
    </LinkPressable>
  );
}

const styles = StyleSheet.create({
  link: {
    minHeight: sizes.touch,
    justifyContent: 'center',
    alignSelf: 'flex-start',
    borderRadius: radii.sm,
  },
  text: {
    textDecorationLine: 'underline',
  },
  focused: {
    outlineColor: colors.focus,
    outlineStyle: 'solid',
    outlineWidth: sizes.focusRing,
  },
});
