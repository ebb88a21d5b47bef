import { Timeline } from '@/components/history/timeline';
import { useAssetHistoryQuery } from '@/hooks/queries/assets';
import { describeEntry } from './history-words';

/** The asset's append-only history, newest first: who, when, what, and each field's before -> after. */
export function AssetHistory({ assetId }: { assetId: string }) {
  const history = useAssetHistoryQuery(assetId);
  return <Timeline history={history} describe={describeEntry} testID="asset-history" rowTestID={(entry) => `history-${entry.id}`} />;
}
