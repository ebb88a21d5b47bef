import { useWindowDimensions } from 'react-native';
import { breakpoints } from '@/components/theme/tokens';

export function useBreakpoints() {
  const { width, height } = useWindowDimensions();
  return { width, height, isWide: width >= breakpoints.wide };
}
