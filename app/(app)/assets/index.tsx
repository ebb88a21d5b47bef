import { useLocalSearchParams } from 'expo-router';
import { AssetListScreen, type AssetListParams } from '@/components/assets/asset-list-screen';

export default function AssetsRoute() {
  const params = useLocalSearchParams<Record<keyof AssetListParams, string>>();
  return <AssetListScreen params={params} />;
}
