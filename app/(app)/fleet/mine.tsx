import { MyDrivesScreen } from '@/components/fleet/my-drives-screen';

export default function MyDrivesRoute() {
  return <MyDrivesScreen />;
}
