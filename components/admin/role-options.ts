import type { SelectOption } from '@/components/ui/select';
import { ROLES, ROLE_LABELS, type Program, type Role } from '@/shared/schemas/auth';

export const ROLE_OPTIONS: SelectOption<Role>[] = ROLES.map((role) => ({ value: role, label: ROLE_LABELS[role] }));

export function programOptions(programs: readonly Program[], testIDPrefix?: string): SelectOption<string>[] {
  return programs.map((program) => ({
    value: program.id,
    label: program.code,
    description: program.name,
    testID: testIDPrefix ? `${testIDPrefix}-${program.code}` : undefined,
  }));
}
