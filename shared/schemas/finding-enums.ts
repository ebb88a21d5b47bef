import { z } from 'zod';

/** PRODUCT.md section 3C. `safety`: the asset may not be driven or powered until it is resolved. */
export const FINDING_SEVERITIES = ['safety', 'blocking', 'major', 'minor'] as const;
export const FindingSeveritySchema = z.enum(FINDING_SEVERITIES);
export type FindingSeverity = z.infer<typeof FindingSeveritySchema>;
export const FINDING_SEVERITY_LABELS: Record<FindingSeverity, string> = {
  safety: 'Safety',
  blocking: 'Blocking',
  major: 'Major',
  minor: 'Minor',
};

export const FINDING_STATUSES = ['open', 'in-work', 'fixed', 'verified', 'rejected'] as const;
export const FindingStatusSchema = z.enum(FINDING_STATUSES);
export type FindingStatus = z.infer<typeof FindingStatusSchema>;
export const FINDING_STATUS_LABELS: Record<FindingStatus, string> = {
  open: 'Open',
  'in-work': 'In work',
  fixed: 'Fixed, awaiting check',
  verified: 'Verified',
  rejected: 'Rejected',
};
/** A finding in one of these states no longer counts against the asset. */
export const CLOSED_FINDING_STATUSES: readonly FindingStatus[] = ['verified', 'rejected'];
