import { useLocalSearchParams } from 'expo-router';
import { LabelSheetScreen } from '@/components/labels/label-sheet-screen';

export default function AssetLabelRoute() {
  const { assetId } = useLocalSearchParams<{ assetId: string }>();
  return <LabelSheetScreen assetIds={[assetId]} backHref={`/assets/${assetId}`} />;
}
