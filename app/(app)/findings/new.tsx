import { useLocalSearchParams } from 'expo-router';
import { FindingCaptureScreen, type FindingCaptureParams } from '@/components/findings/finding-capture-screen';

export default function NewFindingRoute() {
  const params = useLocalSearchParams<Record<keyof FindingCaptureParams, string>>();
  return <FindingCaptureScreen key={`${params.assetId ?? ''}-${params.checklistItemId ?? ''}`} params={params} />;
}
