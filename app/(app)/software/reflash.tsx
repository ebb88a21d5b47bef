import { useLocalSearchParams } from 'expo-router';
import { SoftwareReflashScreen, type ReflashParams } from '@/components/software/software-reflash-screen';

export default function SoftwareReflashRoute() {
  const params = useLocalSearchParams<Record<keyof ReflashParams, string>>();
  return <SoftwareReflashScreen params={params} />;
}
