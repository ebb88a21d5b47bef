import { useLocalSearchParams } from 'expo-router';
import { TestDetailScreen } from '@/components/validation/test-detail-screen';

export default function ValidationTestRoute() {
  const { testId } = useLocalSearchParams<{ testId: string }>();
  return <TestDetailScreen key={testId} testId={testId} />;
}
