import { ProgramCampaignsScreen } from '@/components/validation/program-campaigns-screen';

export default function ProgramCampaignsRoute() {
  return <ProgramCampaignsScreen />;
}
