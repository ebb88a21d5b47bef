import { Text as RNText, StyleSheet, type TextProps as RNTextProps } from 'react-native';
import { useFontsLoaded } from '@/components/theme/font-state';
import { colors, fontFor, typeScale, type FontWeightName, type TypeVariant } from '@/components/theme/tokens';
import { webOnly } from './web-props';

export type TextTone = 'default' | 'muted' | 'primary' | 'onPrimary' | 'danger' | 'warning' | 'success';

export type TextProps = RNTextProps & {
  variant?: TypeVariant;
  tone?: TextTone;
  weight?: FontWeightName;
  align?: 'left' | 'center' | 'right';
};

export function Text({ variant = 'body', tone = 'default', weight, align, style, ...rest }: TextProps) {
  const loaded = useFontsLoaded();
  const scale = typeScale[variant];
  return (
    <RNText
      style={[
        styles[variant],
        fontFor(weight ?? scale.weight, loaded),
        toneStyles[tone],
        align ? { textAlign: align } : null,
        style,
      ]}
      {...rest}
    />
  );
}

export type HeadingProps = TextProps & {
  level?: 1 | 2 | 3;
};

const levelVariant: Record<1 | 2 | 3, TypeVariant> = { 1: 'display', 2: 'title', 3: 'heading' };

/** A heading: `h1`-`h3` on the web, a header for screen readers on phones. */
export function Heading({ level = 1, variant, ...rest }: HeadingProps) {
  return (
    <Text
      variant={variant ?? levelVariant[level]}
      accessibilityRole="header"
      {...webOnly({ 'aria-level': level })}
      {...rest}
    />
  );
}

const styles = StyleSheet.create({
  display: { fontSize: typeScale.display.fontSize, lineHeight: typeScale.display.lineHeight },
  title: { fontSize: typeScale.title.fontSize, lineHeight: typeScale.title.lineHeight },
  heading: { fontSize: typeScale.heading.fontSize, lineHeight: typeScale.heading.lineHeight },
  body: { fontSize: typeScale.body.fontSize, lineHeight: typeScale.body.lineHeight },
  bodyStrong: { fontSize: typeScale.bodyStrong.fontSize, lineHeight: typeScale.bodyStrong.lineHeight },
  label: { fontSize: typeScale.label.fontSize, lineHeight: typeScale.label.lineHeight },
  caption: { fontSize: typeScale.caption.fontSize, lineHeight: typeScale.caption.lineHeight },
});

const toneStyles = StyleSheet.create({
  default: { color: colors.text },
  muted: { color: colors.textMuted },
  primary: { color: colors.primary },
  onPrimary: { color: colors.onPrimary },
  danger: { color: colors.danger },
  warning: { color: colors.warning },
  success: { color: colors.success },
});
