/** API paths of readiness, stage roll-ups, trends, gate reviews and gate actions (issue 7); apart from paths.ts while other work is open in the same tree. */
export const READINESS_API = {
  /** -> AssetReadiness */
  assetReadiness: (assetId: string) => `/api/assets/${assetId}/readiness`,
  /** -> ProgramReadiness: every stage's roll-up with its blockers and forecast */
  programReadiness: (programId: string) => `/api/programs/${programId}/readiness`,
  /** -> StageTrend: 30 days of daily snapshots, the 14-day least-squares line and the forecast */
  stageTrend: (stageId: string) => `/api/stages/${stageId}/trend`,
  /** PUT `{ date: 'YYYY-MM-DD' | null }` (lead) -> TargetDateResult */
  stageTargetDate: (stageId: string) => `/api/stages/${stageId}/target-date`,
  /** GET `?programId=&stageId=` -> GateReviewList; POST CreateGateReview (lead) -> GateReview */
  gateReviews: '/api/gate-reviews',
  /** GET -> GateReview; PATCH `{ attendees?, notes?, version }` (lead, until decided) */
  gateReview: (id: string) => `/api/gate-reviews/${id}`,
  /** POST GateDecision (lead, once) -> GateReview */
  gateReviewDecision: (id: string) => `/api/gate-reviews/${id}/decision`,
  /** GET `?programId=&mine=true&status=` -> GateActionList */
  gateActions: '/api/gate-actions',
  /** PATCH `{ status, note?, version }` (its owner or a lead) -> GateAction */
  gateAction: (id: string) => `/api/gate-actions/${id}`,
  /** The page a decision e-mail links to. */
  gateReviewPage: (id: string) => `/gates/${id}`,
} as const;

/** Plain sentences for the readiness and gate error codes (the server's message is usually the better one). */
export const READINESS_ERROR_SENTENCES: Record<string, string> = {
  'gate/decided': 'This gate review is decided and cannot be changed. Open a new review that corrects it.',
  'gate/review-open': 'A review of this stage is already open: record its decision first.',
  'gate/already-corrected': 'This review has already been corrected: correct the correction instead.',
  'gate/action-forbidden': "Only the action's owner or a lead can change it.",
};
