import { useLocalSearchParams } from 'expo-router';
import { AssetDetailScreen } from '@/components/assets/asset-detail-screen';

export default function AssetRoute() {
  const { assetId } = useLocalSearchParams<{ assetId: string }>();
  return <AssetDetailScreen key={assetId} assetId={assetId} />;
}
