import { DriversScreen } from '@/components/fleet/drivers-screen';

export default function DriversRoute() {
  return <DriversScreen />;
}
