import { useLocalSearchParams } from 'expo-router';
import { NewTestScreen } from '@/components/validation/test-detail-screen';

export default function NewValidationTestRoute() {
  const { stageId } = useLocalSearchParams<{ stageId?: string }>();
  return <NewTestScreen stageId={stageId || undefined} />;
}
