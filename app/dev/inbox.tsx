import { InboxScreen } from '@/components/dev/inbox-screen';

export default function DevInboxRoute() {
  return <InboxScreen />;
}
