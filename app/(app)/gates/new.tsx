import { useLocalSearchParams } from 'expo-router';
import { GateOpenScreen, type GateOpenParams } from '@/components/gates/gate-open-screen';

export default function NewGateReviewRoute() {
  const params = useLocalSearchParams<Record<keyof GateOpenParams, string>>();
  return <GateOpenScreen key={`${params.stageId ?? ''}-${params.corrects ?? ''}`} params={params} />;
}
