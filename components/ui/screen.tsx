import type { ReactNode } from 'react';
import { ScrollView, StyleSheet, View } from 'react-native';
import { useSafeAreaInsets } from 'react-native-safe-area-context';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { colors, sizes, spacing } from '@/components/theme/tokens';

export type ScreenProps = {
  children: ReactNode;
  /** Narrow column for forms (sign-in, set password). */
  narrow?: boolean;
  /** Pad for the status bar when no shell sits above the screen. */
  safeTop?: boolean;
  scroll?: boolean;
  /** The page's main landmark, for screens drawn outside the app shell (which gives its own). */
  main?: boolean;
  testID?: string;
};

/** The page container: scrolls, pads, and keeps content to a readable width on wide screens. */
export function Screen({ children, narrow = false, safeTop = false, scroll = true, main = false, testID }: ScreenProps) {
  const { isWide } = useBreakpoints();
  const insets = useSafeAreaInsets();
  const padding = isWide ? spacing.xxl : spacing.lg;
  const inner = (
    <View style={[styles.column, narrow ? styles.narrow : styles.wide]}>{children}</View>
  );
  const pad = {
    paddingHorizontal: padding,
    paddingTop: padding + (safeTop ? insets.top : 0),
    paddingBottom: padding + spacing.xxl,
  };

  const page = !scroll ? (
    <View style={[styles.fill, pad]} testID={testID}>
      {inner}
    </View>
  ) : (
    <ScrollView
      style={styles.fill}
      contentContainerStyle={[styles.content, pad]}
      keyboardShouldPersistTaps="handled"
      testID={testID}
    >
      {inner}
    </ScrollView>
  );
  return main ? (
    <View style={styles.fill} role="main">
      {page}
    </View>
  ) : (
    page
  );
}

const styles = StyleSheet.create({
  fill: {
    flex: 1,
    backgroundColor: colors.bg,
  },
  content: {
    flexGrow: 1,
  },
  column: {
    width: '100%',
    alignSelf: 'center',
    gap: spacing.xl,
  },
  wide: {
    maxWidth: sizes.contentMaxWidth,
  },
  narrow: {
    maxWidth: sizes.formMaxWidth,
  },
});
