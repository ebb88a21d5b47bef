import { ProposalsScreen } from '@/components/fleet/proposals-screen';

export default function ProposalsRoute() {
  return <ProposalsScreen />;
}
