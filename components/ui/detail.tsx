import type { ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';
import { spacing } from '@/components/theme/tokens';
import { Card } from './card';
import { Heading, Text } from './text';

/**
 * The top of a detail page: a muted line saying what it is, the name as the page's heading, a row
 * of badges, anything under them (`children`), and something at the right (`aside`).
 */
export function DetailHeader({
  eyebrow,
  title,
  titleVariant = 'title',
  titleTestID,
  badges,
  aside,
  children,
}: {
  eyebrow: string;
  title: string;
  titleVariant?: 'display' | 'title';
  titleTestID?: string;
  badges: ReactNode;
  aside?: ReactNode;
  children?: ReactNode;
}) {
  return (
    <View style={styles.header}>
      <View style={styles.headerText}>
        <Text variant="caption" tone="muted">
          {eyebrow}
        </Text>
        <Heading level={1} variant={titleVariant} testID={titleTestID} selectable>
          {title}
        </Heading>
        <View style={styles.badges}>{badges}</View>
        {children}
      </View>
      {aside}
    </View>
  );
}

/**
 * A card with a second-level heading. With `action` (even `null`), the heading shares its row
 * with it at the right, e.g. an "Edit" button shown only to those who may edit.
 */
export function Section({ title, action, testID, children }: { title: string; action?: ReactNode; testID?: string; children: ReactNode }) {
  const heading = (
    <Heading level={2} variant="heading">
      {title}
    </Heading>
  );
  return (
    <Card testID={testID}>
      {action === undefined ? (
        heading
      ) : (
        <View style={styles.sectionHead}>
          {heading}
          {action}
        </View>
      )}
      {children}
    </Card>
  );
}

/** One labelled value in a section: the label in a narrow column at the left. A string value may be `selectable`. */
export function Fact({ label, selectable, children }: { label: string; selectable?: boolean; children: ReactNode }) {
  return (
    <View style={styles.fact}>
      <Text variant="label" tone="muted" style={styles.factLabel}>
        {label}
      </Text>
      <View style={styles.factValue}>{typeof children === 'string' ? <Text selectable={selectable}>{children}</Text> : children}</View>
    </View>
  );
}

/** Two columns side by side (a wide screen); each stacks its sections. */
export function Columns({ left, right }: { left: ReactNode; right: ReactNode }) {
  return (
    <View style={styles.columns}>
      <View style={styles.column}>{left}</View>
      <View style={styles.column}>{right}</View>
    </View>
  );
}

const styles = StyleSheet.create({
  header: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    justifyContent: 'space-between',
    gap: spacing.md,
  },
  headerText: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xs,
  },
  badges: {
    flexDirection: 'row',
    flexWrap: 'wrap',
    gap: spacing.xs,
  },
  sectionHead: {
    flexDirection: 'row',
    alignItems: 'center',
    justifyContent: 'space-between',
    gap: spacing.md,
  },
  fact: {
    flexDirection: 'row',
    gap: spacing.md,
    alignItems: 'flex-start',
  },
  factLabel: {
    width: 96,
    paddingTop: spacing.xxs,
  },
  factValue: {
    flex: 1,
    minWidth: 0,
    alignItems: 'flex-start',
  },
  columns: {
    flexDirection: 'row',
    alignItems: 'flex-start',
    gap: spacing.xl,
  },
  column: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xl,
  },
});
