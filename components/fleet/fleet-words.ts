import type { BadgeTone } from '@/components/ui/chip';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { FLEET_ERROR_SENTENCES } from '@/shared/api/fleet-paths';
import { overlaps } from '@/shared/domain/fleet';
import type { Role } from '@/shared/schemas/auth';
import {
  ASSIGNMENT_PURPOSE_LABELS,
  DRIVING_LEVEL_LABELS,
  type Assignment,
  type AssignmentStatus,
  type DriverProfile,
  type RefusalCode,
} from '@/shared/schemas/fleet';
import { formatDate } from '@/components/assets/asset-words';

/** Who books, changes, cancels, keeps the roster and plans (the server's FLEET_MANAGERS). */
export const isFleetManager = (role: Role | null | undefined) => role === 'coordinator' || role === 'lead';

/**
 * The sentence for a failed fleet request. The server's own sentence is used where it says more
 * (the time a window starts, the odometer's reading); a code without one gets the fleet's plain
 * sentence. A refusal's reasons are listed apart, so its sentence stays short.
 */
export function fleetErrorMessage(error: unknown): string {
  if (!isApiError(error)) return errorMessage(error);
  if (error.code === 'assignment/refused') return FLEET_ERROR_SENTENCES['assignment/refused'];
  const fleetSentence = FLEET_ERROR_SENTENCES[error.code];
  if (fleetSentence && !error.message.trim()) return fleetSentence;
  return errorMessage(error);
}

export const ASSIGNMENT_STATUS_TONES: Record<AssignmentStatus, BadgeTone> = {
  planned: 'primary',
  'checked-out': 'warning',
  returned: 'success',
  cancelled: 'neutral',
};

/** What a refusal is about, as a short heading before the server's sentence. */
export const REFUSAL_TITLES: Record<RefusalCode, string> = {
  'vehicle-overlap': 'Vehicle already booked',
  'driver-overlap': 'Driver already booked',
  'vehicle-not-cleared': 'Vehicle not cleared (safety)',
  'vehicle-unavailable': 'Vehicle down or retired',
  'vehicle-in-use': 'Vehicle not back yet',
  'driver-level': 'Driving level too low',
  'licence-expired': 'Driving licence expired',
  'licence-unknown': 'No licence expiry on file',
};

export const purposeLabel = (assignment: Pick<Assignment, 'purpose'>) => ASSIGNMENT_PURPOSE_LABELS[assignment.purpose];

/** "Ana Ruiz · Ride and handling": the words on a timeline bar and a day card. */
export const barLabel = (a: Assignment) => `${a.driver.name} · ${purposeLabel(a)}`;

export type LicenceFlag = { label: string; tone: BadgeTone } | null;

export function licenceFlag(driver: Pick<DriverProfile, 'licenceExpired' | 'licenceExpiresSoon' | 'licenceExpiry'>): LicenceFlag {
  if (!driver.licenceExpiry) return { label: 'No licence expiry on file', tone: 'danger' };
  if (driver.licenceExpired) return { label: 'Licence expired', tone: 'danger' };
  if (driver.licenceExpiresSoon) return { label: 'Licence expires soon', tone: 'warning' };
  return null;
}

/** "Level 2 · HV aware · licence to 3 Dec 2027". */
export function driverSummary(driver: DriverProfile): string {
  const parts = [DRIVING_LEVEL_LABELS[driver.drivingLevel] ?? `Level ${driver.drivingLevel}`];
  parts.push(driver.hvAwareness ? 'HV aware' : 'No HV awareness');
  parts.push(driver.licenceExpiry ? `licence to ${formatDate(driver.licenceExpiry)}` : 'licence expiry unknown');
  return parts.join(' · ');
}

const LIVE: AssignmentStatus[] = ['planned', 'checked-out'];

/** The time an assignment holds its vehicle on the plan: an overdue one until now. */
export function heldUntil(a: Assignment, now: number): number {
  const end = Date.parse(a.endsAt);
  return a.status === 'checked-out' ? Math.max(end, now) : end;
}

/**
 * Live assignments that clash with another live one on the same vehicle or driver. The server
 * refuses such bookings, but a vehicle not brought back in time runs into the next booking.
 */
export function conflictingIds(assignments: readonly Assignment[], now: number): Set<string> {
  const live = assignments.filter((a) => LIVE.includes(a.status));
  const out = new Set<string>();
  for (let i = 0; i < live.length; i += 1) {
    for (let j = i + 1; j < live.length; j += 1) {
      const a = live[i];
      const b = live[j];
      if (a.assetId !== b.assetId && a.driver.id !== b.driver.id) continue;
      if (overlaps({ startsAt: a.startsAt, endsAt: heldUntil(a, now) }, { startsAt: b.startsAt, endsAt: heldUntil(b, now) })) {
        out.add(a.id);
        out.add(b.id);
      }
    }
  }
  return out;
}

/** Words for the state of an assignment at `now`: "Overdue return", "Out now", "Starts in 3 h" ... */
export function assignmentFlags(a: Assignment, conflicts: ReadonlySet<string>): Array<{ label: string; tone: BadgeTone }> {
  const flags: Array<{ label: string; tone: BadgeTone }> = [];
  if (a.overdueReturn) flags.push({ label: 'Overdue return', tone: 'danger' });
  if (conflicts.has(a.id)) flags.push({ label: 'Conflict', tone: 'danger' });
  if (!a.vehicle.cleared && LIVE.includes(a.status)) flags.push({ label: 'Vehicle not cleared', tone: 'danger' });
  if (a.levelOverrideReason) flags.push({ label: 'Level rule overridden', tone: 'warning' });
  return flags;
}
