import { useLocalSearchParams } from 'expo-router';
import { AssetCampaignsScreen } from '@/components/validation/asset-campaigns-screen';

export default function AssetCampaignsRoute() {
  const { assetId, campaignId } = useLocalSearchParams<{ assetId: string; campaignId?: string }>();
  return <AssetCampaignsScreen key={assetId} assetId={assetId} campaignId={campaignId || undefined} />;
}
