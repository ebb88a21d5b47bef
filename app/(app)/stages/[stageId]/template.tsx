import { useLocalSearchParams } from 'expo-router';
import { TemplateScreen } from '@/components/stages/template-screen';

export default function StageTemplateRoute() {
  const { stageId } = useLocalSearchParams<{ stageId: string }>();
  return <TemplateScreen key={stageId} stageId={stageId} />;
}
