import { useLocalSearchParams } from 'expo-router';
import { GateReviewScreen } from '@/components/gates/gate-review-screen';

export default function GateReviewRoute() {
  const { reviewId } = useLocalSearchParams<{ reviewId: string }>();
  return <GateReviewScreen key={reviewId} reviewId={reviewId} />;
}
