import { useLocalSearchParams, useRouter } from 'expo-router';
import { ProgramsScreen } from '@/components/admin/programs-screen';
import { RequireRole } from '@/components/shell/require-role';

export default function AdminProgramsRoute() {
  const { program } = useLocalSearchParams<{ program?: string }>();
  const router = useRouter();
  return (
    <RequireRole roles={['admin']}>
      <ProgramsScreen
        selectedId={program || null}
        onSelect={(programId) => router.setParams({ program: programId ?? '' })}
      />
    </RequireRole>
  );
}
