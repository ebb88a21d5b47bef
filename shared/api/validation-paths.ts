/** API paths of the validation plan, test campaigns and their calculations (issue 7); apart from paths.ts while other work is open in the same tree. */
export const VALIDATION_API = {
  /** `?reliability=&confidence=&testToLife=&shape=` -> `{ n, exact }` */
  sampleSize: '/api/calc/sample-size',
  /** `?samples=&confidence=&testToLife=&shape=` -> `{ reliability }` */
  demonstratedReliability: '/api/calc/demonstrated-reliability',
  /** `?temperature=&humidity=` -> `{ dewPoint, note }` */
  dewPoint: '/api/calc/dew-point',
  /** `?programId=&stageId=` */
  tests: '/api/validation/tests',
  test: (id: string) => `/api/validation/tests/${id}`,
  testAllocations: (id: string) => `/api/validation/tests/${id}/allocations`,
  allocation: (id: string) => `/api/validation/allocations/${id}`,
  /** multipart, field `report` (PDF or image, at most 20 MB) */
  allocationReport: (id: string) => `/api/validation/allocations/${id}/report`,
  /** `?programId=&stageId=`: every campaign of the program, for the plan view */
  programCampaigns: '/api/validation/campaigns',
  assetCampaigns: (assetId: string) => `/api/assets/${assetId}/campaigns`,
  campaign: (id: string) => `/api/campaigns/${id}`,
  campaignProgress: (id: string) => `/api/campaigns/${id}/progress`,
  /** JSON `{ csv }` or a `text/csv` body */
  campaignLog: (id: string) => `/api/campaigns/${id}/log`,
} as const;

/** Plain sentences for the validation error codes (the server's message is usually the better one). */
export const VALIDATION_ERROR_SENTENCES: Record<string, string> = {
  'validation/already-allocated': 'This asset is already allocated to this test.',
  'validation/test-name-taken': 'Another test of this stage has this name.',
  'campaign/log-invalid': 'Some rows of the log could not be read; nothing was recorded.',
  'upload/unsupported-type': 'Send the report as a PDF or a picture.',
  'upload/too-large': 'The report is larger than 20 MB.',
};
