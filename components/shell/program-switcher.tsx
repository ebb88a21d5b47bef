import { Select } from '@/components/ui/select';
import { Text } from '@/components/ui/text';
import { useSession } from '@/hooks/use-session';

/** Chooses the program that every program-scoped screen shows. */
export function ProgramSwitcher({ layout = 'list', testID = 'program-switcher' }: { layout?: 'list' | 'chips'; testID?: string }) {
  const { programs, currentProgramId, setCurrentProgram } = useSession();
  if (programs.length === 0) {
    return (
      <Text variant="caption" tone="muted" testID={testID}>
        You are not in any program yet. An administrator can add you.
      </Text>
    );
  }
  return (
    <Select
      label="Current program"
      layout={layout}
      testID={testID}
      value={currentProgramId}
      onChange={setCurrentProgram}
      options={programs.map((program) => ({
        value: program.id,
        label: program.code,
        description: program.name,
        testID: `${testID}-${program.code}`,
      }))}
    />
  );
}
