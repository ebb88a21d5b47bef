import { useLocalSearchParams } from 'expo-router';
import { FleetScreen, type FleetParams } from '@/components/fleet/fleet-screen';

export default function FleetRoute() {
  const params = useLocalSearchParams<Record<keyof FleetParams, string>>();
  return <FleetScreen params={params} />;
}
