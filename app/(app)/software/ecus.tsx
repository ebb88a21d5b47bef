import { EcuCatalogueScreen } from '@/components/software/ecu-catalogue-screen';

export default function SoftwareEcusRoute() {
  return <EcuCatalogueScreen />;
}
