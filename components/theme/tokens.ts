import { Platform } from 'react-native';

/**
 * Proofyard's palette. Text pairs meet WCAG AA on `bg` and `surface` (textMuted 5.9:1 on bg,
 * state colours at least 5.3:1 on their tints); `borderStrong` and `focus` meet the 3:1
 * non-text contrast that input edges and focus rings need.
 */
const palette = {
  slate900: '#1B2420',
  slate700: '#57605B',
  slate500: '#7A7F76',
  green900: '#162B26',
  green800: '#1F3A33',
  green100: '#E2ECE7',
  sand50: '#F6F4EF',
  sand100: '#EFECE4',
  sand300: '#D9D4C7',
  white: '#FFFFFF',
  amber400: '#E8A23A',
  amber700: '#B26A00',
  amber800: '#8A5400',
  amber50: '#FCF1DC',
  red700: '#A8321F',
  red50: '#FBEAE6',
  leaf700: '#2E6A3C',
  leaf50: '#E6F1E8',
  shadow: '#000000',
} as const;

export const colors = {
  bg: palette.sand50,
  surface: palette.white,
  surfaceMuted: palette.sand100,
  text: palette.slate900,
  textMuted: palette.slate700,
  primary: palette.green800,
  primaryPressed: palette.green900,
  primaryTint: palette.green100,
  onPrimary: palette.white,
  accent: palette.amber400,
  border: palette.sand300,
  borderStrong: palette.slate500,
  danger: palette.red700,
  dangerTint: palette.red50,
  warning: palette.amber800,
  warningTint: palette.amber50,
  success: palette.leaf700,
  successTint: palette.leaf50,
  focus: palette.amber700,
  shadow: palette.shadow,
} as const;

export const readiness = {
  go: palette.leaf700,
  conditional: palette.amber800,
  noGo: palette.red700,
  goTint: palette.leaf50,
  conditionalTint: palette.amber50,
  noGoTint: palette.red50,
} as const;

export const spacing = {
  xxs: 2,
  xs: 4,
  sm: 8,
  md: 12,
  lg: 16,
  xl: 24,
  xxl: 32,
  xxxl: 48,
} as const;

export const radii = {
  sm: 6,
  md: 10,
  lg: 14,
  pill: 999,
} as const;

export const sizes = {
  /** Smallest touch target on any platform (WCAG 2.5.5 / Apple HIG). */
  touch: 44,
  /** Primary controls are a little larger: people use this with gloves on. */
  control: 48,
  contentMaxWidth: 960,
  formMaxWidth: 440,
  sideNav: 240,
  tabBar: 60,
  topBar: 52,
  focusRing: 3,
  iconXs: 14,
  iconSm: 18,
  indicator: 22,
  icon: 22,
} as const;

export const breakpoints = {
  wide: 1024,
} as const;

const webFallback = 'system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif';

export type FontWeightName = 'regular' | 'medium' | 'semibold';

export const fontFamilies: Record<FontWeightName, string> = {
  regular: 'WorkSans_400Regular',
  medium: 'WorkSans_500Medium',
  semibold: 'WorkSans_600SemiBold',
};

const numericWeight: Record<FontWeightName, '400' | '500' | '600'> = {
  regular: '400',
  medium: '500',
  semibold: '600',
};

/**
 * Font style for a weight. Each Work Sans weight is registered as its own family at normal
 * weight, so once loaded we must not also ask for a bold weight (the browser would embolden it
 * again). Until the fonts arrive, text paints in the system font with the matching weight.
 */
export function fontFor(weight: FontWeightName, loaded: boolean) {
  if (loaded) {
    return Platform.OS === 'web'
      ? { fontFamily: `${fontFamilies[weight]}, ${webFallback}` }
      : { fontFamily: fontFamilies[weight] };
  }
  return {
    fontFamily: Platform.OS === 'web' ? webFallback : undefined,
    fontWeight: numericWeight[weight],
  };
}

export const typeScale = {
  display: { fontSize: 28, lineHeight: 34, weight: 'semibold' },
  title: { fontSize: 22, lineHeight: 28, weight: 'semibold' },
  heading: { fontSize: 18, lineHeight: 24, weight: 'semibold' },
  body: { fontSize: 16, lineHeight: 24, weight: 'regular' },
  bodyStrong: { fontSize: 16, lineHeight: 24, weight: 'medium' },
  label: { fontSize: 14, lineHeight: 20, weight: 'medium' },
  caption: { fontSize: 13, lineHeight: 18, weight: 'regular' },
} as const satisfies Record<string, { fontSize: number; lineHeight: number; weight: FontWeightName }>;

export type TypeVariant = keyof typeof typeScale;

export const shadows = {
  card: {
    shadowColor: colors.shadow,
    shadowOpacity: 0.05,
    shadowRadius: 6,
    shadowOffset: { width: 0, height: 1 },
    elevation: 1,
  },
} as const;
