import { AssetCreateScreen } from '@/components/assets/asset-create-screen';
import { RequireRole } from '@/components/shell/require-role';

export default function NewAssetRoute() {
  return (
    <RequireRole roles={['technician', 'engineer', 'lead']}>
      <AssetCreateScreen />
    </RequireRole>
  );
}
