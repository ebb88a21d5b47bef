import { GateListScreen } from '@/components/gates/gate-list-screen';

export default function GatesRoute() {
  return <GateListScreen />;
}
