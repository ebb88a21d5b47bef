import { NotFoundScreen } from '@/components/shell/not-found-screen';

export default function NotFoundRoute() {
  return <NotFoundScreen />;
}
