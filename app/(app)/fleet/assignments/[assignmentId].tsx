import { useLocalSearchParams } from 'expo-router';
import { AssignmentDetailScreen } from '@/components/fleet/assignment-detail-screen';

export default function AssignmentRoute() {
  const { assignmentId, booked } = useLocalSearchParams<{ assignmentId: string; booked?: string }>();
  return <AssignmentDetailScreen key={assignmentId} assignmentId={assignmentId} booked={booked === '1'} />;
}
