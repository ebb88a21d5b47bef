import { useLocalSearchParams } from 'expo-router';
import { ValidationPlanScreen } from '@/components/validation/validation-plan-screen';

export default function ValidationPlanRoute() {
  const { stageId } = useLocalSearchParams<{ stageId?: string }>();
  return <ValidationPlanScreen stageId={stageId || undefined} />;
}
