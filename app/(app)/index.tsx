import { HomeScreen } from '@/components/home/home-screen';

export default function HomeRoute() {
  return <HomeScreen />;
}
