import { useState } from 'react';
import { StyleSheet, View } from 'react-native';
import { Card } from '@/components/ui/card';
import { Heading, Text } from '@/components/ui/text';
import { TextField } from '@/components/ui/text-field';
import { colors, radii, spacing } from '@/components/theme/tokens';
import { useBreakpoints } from '@/hooks/use-breakpoints';
import { dewPoint, dewPointNote, humidityProblem, temperatureProblem } from '@/shared/domain/dew-point';
import { SampleSizePanel } from './sample-size-panel';
import { formatTemperature, previewSampleSize, readNumber, type SampleSizeTexts } from './validation-words';

/** Labels and hints of the four inputs, shared by the calculator and the test form. */
export const SAMPLE_SIZE_FIELDS = {
  reliability: { label: 'Target reliability R', hint: 'Between 0 and 1: 0.9 means 90 %.' },
  confidence: { label: 'Confidence C', hint: 'Between 0 and 1: 0.9 means 90 %.' },
  testToLife: { label: 'Test-to-life ratio L (optional)', hint: 'Time-based tests: test time over target life. Give b with it.' },
  shape: { label: 'Weibull shape b (optional)', hint: 'The failure mode’s Weibull slope. Give L with it.' },
} as const;

/** Quick what-ifs on the plan page: a sample size and a dew point, computed as the user types. */
export function CalculatorCard() {
  const { isWide } = useBreakpoints();
  const [texts, setTexts] = useState<SampleSizeTexts>({ reliability: '0.9', confidence: '0.9', testToLife: '', shape: '' });
  const [temperature, setTemperature] = useState('25');
  const [humidity, setHumidity] = useState('93');
  const set = (field: keyof SampleSizeTexts) => (value: string) => setTexts((t) => ({ ...t, [field]: value }));

  return (
    <Card testID="validation-calculator">
      <Heading level={2} variant="heading">
        Calculator
      </Heading>
      <Text tone="muted">For quick what-ifs; nothing here is saved.</Text>
      <View style={[styles.sections, isWide && styles.sectionsWide]}>
        <View style={styles.section}>
          <Heading level={3} variant="bodyStrong">
            Sample size
          </Heading>
          <View style={styles.pair}>
            <View style={styles.pairItem}>
              <TextField
                label="Reliability R"
                value={texts.reliability}
                onChangeText={set('reliability')}
                inputMode="decimal"
                testID="calc-reliability"
              />
            </View>
            <View style={styles.pairItem}>
              <TextField label="Confidence C" value={texts.confidence} onChangeText={set('confidence')} inputMode="decimal" testID="calc-confidence" />
            </View>
          </View>
          <View style={styles.pair}>
            <View style={styles.pairItem}>
              <TextField label="Test-to-life L" value={texts.testToLife} onChangeText={set('testToLife')} inputMode="decimal" testID="calc-ttl" />
            </View>
            <View style={styles.pairItem}>
              <TextField label="Weibull shape b" value={texts.shape} onChangeText={set('shape')} inputMode="decimal" testID="calc-shape" />
            </View>
          </View>
          <Text variant="caption" tone="muted">
            R and C between 0 and 1 (0.9 means 90 %). L and b only for time-based tests, both or neither.
          </Text>
          <SampleSizePanel preview={previewSampleSize(texts)} testID="calc-n" />
        </View>
        <View style={styles.section}>
          <Heading level={3} variant="bodyStrong">
            Dew point
          </Heading>
          <View style={styles.pair}>
            <View style={styles.pairItem}>
              <TextField label="Air temperature, °C" value={temperature} onChangeText={setTemperature} inputMode="decimal" testID="calc-dew-temperature" />
            </View>
            <View style={styles.pairItem}>
              <TextField label="Relative humidity, %" value={humidity} onChangeText={setHumidity} inputMode="decimal" testID="calc-dew-humidity" />
            </View>
          </View>
          <DewPointResult temperature={temperature} humidity={humidity} />
        </View>
      </View>
    </Card>
  );
}

function DewPointResult({ temperature, humidity }: { temperature: string; humidity: string }) {
  const t = readNumber(temperature) ?? Number.NaN;
  const h = readNumber(humidity) ?? Number.NaN;
  const problem = temperatureProblem('temperature', t) ?? humidityProblem('humidity', h);
  if (problem) {
    return (
      <View style={styles.result} aria-live="polite">
        <Text tone="muted" testID="calc-dew-result">
          {problem.field === 'temperature' ? `Temperature: ${problem.message}` : `Humidity: ${problem.message}`}
        </Text>
      </View>
    );
  }
  const value = dewPoint(t, h);
  const note = dewPointNote(t, value);
  return (
    <View style={styles.result} aria-live="polite">
      <Text variant="title" testID="calc-dew-result">
        Dew point {formatTemperature(value)}
      </Text>
      <Text variant="caption">
        A surface colder than this gathers condensation. Magnus formula with the coefficients of Alduchov and Eskridge (1996), over water.
      </Text>
      {note ? (
        <Text variant="caption" tone="warning" testID="calc-dew-note">
          {note}
        </Text>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  sections: {
    gap: spacing.xl,
  },
  sectionsWide: {
    flexDirection: 'row',
    alignItems: 'flex-start',
  },
  section: {
    flex: 1,
    minWidth: 0,
    gap: spacing.md,
  },
  pair: {
    flexDirection: 'row',
    gap: spacing.md,
  },
  pairItem: {
    flex: 1,
    minWidth: 0,
  },
  result: {
    gap: spacing.xs,
    padding: spacing.md,
    borderRadius: radii.md,
    backgroundColor: colors.surfaceMuted,
  },
});
