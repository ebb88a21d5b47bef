import { MyGateActionsScreen } from '@/components/gates/my-actions-screen';

export default function MyGateActionsRoute() {
  return <MyGateActionsScreen />;
}
