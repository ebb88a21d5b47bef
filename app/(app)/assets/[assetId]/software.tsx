import { useLocalSearchParams } from 'expo-router';
import { AssetSoftwareScreen } from '@/components/software/asset-software-screen';

export default function AssetSoftwareRoute() {
  const { assetId } = useLocalSearchParams<{ assetId: string }>();
  return <AssetSoftwareScreen key={assetId} assetId={assetId} />;
}
