import { useLocalSearchParams } from 'expo-router';
import { StageTrendScreen } from '@/components/readiness/stage-trend-screen';

export default function StageTrendRoute() {
  const { stageId } = useLocalSearchParams<{ stageId: string }>();
  return <StageTrendScreen key={stageId} stageId={stageId} />;
}
