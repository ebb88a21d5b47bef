import { SoftwareMatrixScreen } from '@/components/software/software-matrix-screen';

export default function SoftwareMatrixRoute() {
  return <SoftwareMatrixScreen />;
}
