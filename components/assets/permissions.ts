import type { Role } from '@/shared/schemas/auth';

/**
 * Who may do what on assets, stages and checklists: the same lists as the server's routes, used
 * only to hide controls a role cannot use (the server refuses them anyway).
 */
const rule = (...roles: Role[]) => (role: Role | null | undefined) => Boolean(role && roles.includes(role));

export const can = {
  createAsset: rule('technician', 'engineer', 'lead'),
  editAsset: rule('technician', 'engineer', 'coordinator', 'lead'),
  moveStage: rule('engineer', 'lead'),
  workChecklist: rule('technician', 'engineer', 'lead'),
  editStages: rule('lead'),
  editTemplate: rule('engineer', 'lead'),
};
