import { UtilisationScreen } from '@/components/fleet/utilisation-screen';

export default function UtilisationRoute() {
  return <UtilisationScreen />;
}
