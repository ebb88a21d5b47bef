import { useLocalSearchParams } from 'expo-router';
import { BookScreen, type BookParams } from '@/components/fleet/book-screen';

export default function BookRoute() {
  const params = useLocalSearchParams<Record<keyof BookParams, string>>();
  return <BookScreen params={params} />;
}
