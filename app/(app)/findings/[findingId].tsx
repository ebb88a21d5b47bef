import { useLocalSearchParams } from 'expo-router';
import { FindingDetailScreen } from '@/components/findings/finding-detail-screen';

export default function FindingRoute() {
  const { findingId } = useLocalSearchParams<{ findingId: string }>();
  return <FindingDetailScreen key={findingId} findingId={findingId} />;
}
