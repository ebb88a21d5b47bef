import { useLocalSearchParams } from 'expo-router';
import { FindingsListScreen, type FindingListParams } from '@/components/findings/findings-list-screen';

export default function FindingsRoute() {
  const params = useLocalSearchParams<Record<keyof FindingListParams, string>>();
  return <FindingsListScreen params={params} />;
}
