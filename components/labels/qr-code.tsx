import { useMemo } from 'react';
import Svg, { Path, Rect } from 'react-native-svg';
import { colors } from '@/components/theme/tokens';
import { qrShape } from './qr';

/** A QR code drawn with react-native-svg; dark on white for any phone camera. */
export function QrCode({ value, size, label }: { value: string; size: number; label: string }) {
  const shape = useMemo(() => qrShape(value), [value]);
  return (
    <Svg
      width={size}
      height={size}
      viewBox={`0 0 ${shape.size} ${shape.size}`}
      accessibilityRole="image"
      accessibilityLabel={label}
    >
      <Rect width={shape.size} height={shape.size} fill={colors.surface} />
      <Path d={shape.path} fill={colors.text} />
    </Svg>
  );
}
