import { BaselinesScreen } from '@/components/software/baselines-screen';

export default function SoftwareBaselinesRoute() {
  return <BaselinesScreen />;
}
