import type { ReactNode } from 'react';
import { Platform } from 'react-native';
import Svg, { Circle, Path, Rect } from 'react-native-svg';
import { colors, sizes } from '@/components/theme/tokens';

export type IconName =
  | 'home'
  | 'users'
  | 'programs'
  | 'inbox'
  | 'logout'
  | 'switch'
  | 'check'
  | 'chevron-right'
  | 'back'
  | 'refresh'
  | 'assets'
  | 'stages'
  | 'camera'
  | 'image'
  | 'plus'
  | 'print'
  | 'download'
  | 'warning'
  | 'arrow-up'
  | 'arrow-down'
  | 'chevron-down'
  | 'qr';

type IconProps = {
  name: IconName;
  size?: number;
  color?: string;
};

// Icons sit beside a text label, so assistive technology skips them.
const hidden =
  Platform.OS === 'web'
    ? { 'aria-hidden': true as const }
    : { accessibilityElementsHidden: true, importantForAccessibility: 'no-hide-descendants' as const };

/** 24 x 24 line icons drawn for Proofyard; decorative, so hidden from screen readers. */
export function Icon({ name, size = sizes.icon, color = colors.text }: IconProps) {
  return (
    <Svg
      width={size}
      height={size}
      viewBox="0 0 24 24"
      fill="none"
      stroke={color}
      strokeWidth={1.9}
      strokeLinecap="round"
      strokeLinejoin="round"
      {...hidden}
    >
      {shapes[name]}
    </Svg>
  );
}

const shapes: Record<IconName, ReactNode> = {
  home: (
    <>
      <Path d="M3.5 11 12 4l8.5 7" />
      <Path d="M5.5 9.5V20h4.5v-5.5h4V20h4.5V9.5" />
    </>
  ),
  users: (
    <>
      <Circle cx={9} cy={8} r={3.5} />
      <Path d="M2.5 20c0-3.6 2.9-6 6.5-6s6.5 2.4 6.5 6" />
      <Path d="M15.5 4.6a3.5 3.5 0 0 1 0 6.8" />
      <Path d="M18 14.4c2 .7 3.5 2.8 3.5 5.6" />
    </>
  ),
  programs: (
    <>
      <Path d="M3 15.5V12l2.1-4.3A2 2 0 0 1 6.9 6.5h10.2a2 2 0 0 1 1.8 1.2L21 12v3.5a1 1 0 0 1-1 1h-1" />
      <Path d="M5 16.5H4a1 1 0 0 1-1-1" />
      <Path d="M10 16.5h4" />
      <Path d="M3.5 12h17" />
      <Circle cx={7.5} cy={16.5} r={2} />
      <Circle cx={16.5} cy={16.5} r={2} />
    </>
  ),
  inbox: (
    <>
      <Path d="M3 13.5 5.6 5.7A1 1 0 0 1 6.5 5h11a1 1 0 0 1 .9.7l2.6 7.8V19a1 1 0 0 1-1 1H4a1 1 0 0 1-1-1z" />
      <Path d="M3 13.5h5l1.5 2.5h5l1.5-2.5h5" />
    </>
  ),
  logout: (
    <>
      <Path d="M10 4H5.5a1 1 0 0 0-1 1v14a1 1 0 0 0 1 1H10" />
      <Path d="M15 8l4 4-4 4" />
      <Path d="M19 12H9.5" />
    </>
  ),
  switch: (
    <>
      <Path d="M4 8h14" />
      <Path d="M14.5 4.5 18 8l-3.5 3.5" />
      <Path d="M20 16H6" />
      <Path d="M9.5 12.5 6 16l3.5 3.5" />
    </>
  ),
  check: <Path d="M5 12.5 10 17.5 19 7" />,
  'chevron-right': <Path d="M9.5 5.5 16 12l-6.5 6.5" />,
  back: (
    <>
      <Path d="M10.5 5.5 4 12l6.5 6.5" />
      <Path d="M4.5 12H20" />
    </>
  ),
  refresh: (
    <>
      <Path d="M19.5 12a7.5 7.5 0 1 1-2.2-5.3" />
      <Path d="M19.5 4.5v4.2h-4.2" />
    </>
  ),
  assets: (
    <>
      <Path d="M3.5 12.2V4.5a1 1 0 0 1 1-1h7.7l8.3 8.3a1 1 0 0 1 0 1.4l-7.3 7.3a1 1 0 0 1-1.4 0z" />
      <Circle cx={8} cy={8} r={1.5} />
    </>
  ),
  stages: (
    <>
      <Rect x={3.5} y={4} width={5} height={5} rx={1} />
      <Rect x={3.5} y={15} width={5} height={5} rx={1} />
      <Path d="M12 6.5h8.5" />
      <Path d="M12 17.5h8.5" />
      <Path d="M6 9v6" />
    </>
  ),
  camera: (
    <>
      <Path d="M3.5 8.5a1 1 0 0 1 1-1h3L9 5h6l1.5 2.5h3a1 1 0 0 1 1 1V18a1 1 0 0 1-1 1h-15a1 1 0 0 1-1-1z" />
      <Circle cx={12} cy={13} r={3.5} />
    </>
  ),
  image: (
    <>
      <Rect x={3.5} y={4.5} width={17} height={15} rx={1.5} />
      <Circle cx={9} cy={10} r={1.7} />
      <Path d="m4 17.5 5-4.5 3.5 3 3-2.5 4.5 4" />
    </>
  ),
  plus: (
    <>
      <Path d="M12 5v14" />
      <Path d="M5 12h14" />
    </>
  ),
  print: (
    <>
      <Path d="M7 8.5V3.5h10v5" />
      <Path d="M7 16.5H4.5a1 1 0 0 1-1-1v-6a1 1 0 0 1 1-1h15a1 1 0 0 1 1 1v6a1 1 0 0 1-1 1H17" />
      <Rect x={7} y={13.5} width={10} height={7} rx={0.5} />
    </>
  ),
  download: (
    <>
      <Path d="M12 4v11" />
      <Path d="m7.5 10.5 4.5 4.5 4.5-4.5" />
      <Path d="M4.5 19.5h15" />
    </>
  ),
  warning: (
    <>
      <Path d="M12 4 2.8 19.5h18.4z" />
      <Path d="M12 10v4.5" />
      <Path d="M12 17.2v.3" />
    </>
  ),
  'arrow-up': (
    <>
      <Path d="M12 19.5v-15" />
      <Path d="m6 10.5 6-6 6 6" />
    </>
  ),
  'arrow-down': (
    <>
      <Path d="M12 4.5v15" />
      <Path d="m6 13.5 6 6 6-6" />
    </>
  ),
  'chevron-down': <Path d="M5.5 9.5 12 16l6.5-6.5" />,
  qr: (
    <>
      <Rect x={3.5} y={3.5} width={6.5} height={6.5} rx={0.5} />
      <Rect x={14} y={3.5} width={6.5} height={6.5} rx={0.5} />
      <Rect x={3.5} y={14} width={6.5} height={6.5} rx={0.5} />
      <Path d="M14 14h2.5v2.5H14z" />
      <Path d="M18.5 18.5h2v2h-2z" />
      <Path d="M14 20.5h2" />
      <Path d="M20.5 14v2" />
    </>
  ),
};
