import { StagesScreen } from '@/components/stages/stages-screen';

export default function StagesRoute() {
  return <StagesScreen />;
}
