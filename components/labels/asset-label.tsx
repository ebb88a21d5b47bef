import { StyleSheet, View } from 'react-native';
import { Text } from '@/components/ui/text';
import { colors, radii, spacing } from '@/components/theme/tokens';
import type { LabelData } from './label-data';
import { QrCode } from './qr-code';

/** Screen size of a label: 70 x 37 mm at 4 px per mm. */
const WIDTH = 280;
const HEIGHT = 148;
const QR = 124;

/** The on-screen preview of one label: QR code, tag in large type, program and stage. */
export function AssetLabel({ label }: { label: LabelData }) {
  return (
    <View style={styles.label} testID={`label-${label.id}`}>
      <QrCode value={label.url} size={QR} label={`QR code that opens ${label.tag}`} />
      <View style={styles.text}>
        <Text variant="title" numberOfLines={2} style={styles.tag} testID={`label-${label.id}-tag`}>
          {label.tag}
        </Text>
        <Text variant="caption" numberOfLines={1}>
          {label.programCode} · {label.programName}
        </Text>
        <Text variant="caption" numberOfLines={1}>
          {label.stage}
        </Text>
      </View>
    </View>
  );
}

const styles = StyleSheet.create({
  label: {
    width: WIDTH,
    height: HEIGHT,
    flexDirection: 'row',
    alignItems: 'center',
    gap: spacing.sm,
    padding: spacing.sm,
    backgroundColor: colors.surface,
    borderWidth: 1,
    borderColor: colors.borderStrong,
    borderRadius: radii.sm,
    borderStyle: 'dashed',
  },
  text: {
    flex: 1,
    minWidth: 0,
    gap: spacing.xxs,
  },
  tag: {
    color: colors.text,
  },
});
