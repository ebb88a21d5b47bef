import { SoftwareImportScreen } from '@/components/software/software-import-screen';

export default function SoftwareImportRoute() {
  return <SoftwareImportScreen />;
}
