import { useLocalSearchParams } from 'expo-router';
import { ChecklistScreen } from '@/components/assets/checklist-screen';

export default function ChecklistRoute() {
  const { assetId, visitId } = useLocalSearchParams<{ assetId: string; visitId?: string }>();
  return <ChecklistScreen key={`${assetId}-${visitId ?? ''}`} assetId={assetId} visitId={visitId || undefined} />;
}
