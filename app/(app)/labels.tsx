import { useLocalSearchParams } from 'expo-router';
import { useMemo } from 'react';
import { LabelSheetScreen } from '@/components/labels/label-sheet-screen';

export default function LabelsRoute() {
  const { ids } = useLocalSearchParams<{ ids?: string }>();
  const assetIds = useMemo(() => (ids ?? '').split(',').map((id) => id.trim()).filter(Boolean), [ids]);
  return <LabelSheetScreen assetIds={assetIds} backHref="/assets" />;
}
