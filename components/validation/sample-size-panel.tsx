import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import {
  formatNumber,
  formatPercent,
  SAMPLE_SIZE_FORMULA,
  SAMPLE_SIZE_FORMULA_WEIBULL,
  sampleSizeSentence,
  type SampleSizePreview,
} from './validation-words';

/**
 * The required sample size for what is typed so far (the shared success-run function, so it
 * updates on every keystroke), the formula in words with the numbers put in, and the reliability
 * n passes with no failure demonstrate. `testID` names the n line (`vtest-n`, `calc-n`).
 */
export function SampleSizePanel({ preview, testID }: { preview: SampleSizePreview; testID: string }) {
  if (!preview.ok) {
    return (
      <View style={styles.box} aria-live="polite">
        <Text variant="label" tone="muted">
          Required samples
        </Text>
        <Text tone="muted" testID={testID}>
          {preview.problems[0]?.field === 'reliability' || preview.problems[0]?.field === 'confidence'
            ? 'Enter R and C between 0 and 1 (0.9 means 90 %) to see n.'
            : preview.problems[0]?.message ?? 'Check the values.'}
        </Text>
        <Text variant="caption" tone="muted">
          {SAMPLE_SIZE_FORMULA}; with a test-to-life ratio L and Weibull shape b: {SAMPLE_SIZE_FORMULA_WEIBULL}.
        </Text>
      </View>
    );
  }
  const { n, exact, reliability: r, confidence: c, testToLife: l, shape: b, demonstrated } = preview;
  const weibull = l !== null && b !== null;
  const worked = weibull
    ? `ln(1 − ${formatNumber(c, 4)}) / (${formatNumber(l, 4)}^${formatNumber(b, 4)} · ln ${formatNumber(r, 4)}) = ${formatNumber(exact)}`
    : `ln(1 − ${formatNumber(c, 4)}) / ln(${formatNumber(r, 4)}) = ${formatNumber(exact)}`;
  return (
    <View style={styles.box} aria-live="polite">
      <Text variant="label" tone="muted">
        Required samples, each passing with no failure
      </Text>
      <Text variant="title" testID={testID}>
        {sampleSizeSentence(n, exact)}
      </Text>
      <Text variant="caption">
        {weibull ? SAMPLE_SIZE_FORMULA_WEIBULL : SAMPLE_SIZE_FORMULA}: {worked}, so {n} {n === 1 ? 'sample' : 'samples'}.
      </Text>
      <Text variant="caption" testID={`${testID}-demonstrated`}>
        After {n} passes with no failure the demonstrated reliability is {weibull ? '(1 − C)^(1 / (n · L^b))' : '(1 − C)^(1/n)'} ={' '}
        {formatPercent(demonstrated)} at {formatPercent(c)} confidence.
      </Text>
    </View>
  );
}

const styles = StyleSheet.create({
  box: {
    gap: spacing.xs,
    padding: spacing.md,
    borderRadius: radii.md,
    backgroundColor: colors.primaryTint,
  },
});
