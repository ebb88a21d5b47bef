import { SoftwareReflashScreen } from '@/components/software/software-reflash-screen';

export default function SoftwareReflashRoute() {
  return <SoftwareReflashScreen />;
}
