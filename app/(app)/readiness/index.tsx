import { ReadinessScreen } from '@/components/readiness/readiness-screen';

export default function ReadinessRoute() {
  return <ReadinessScreen />;
}
