/** API paths of findings (issue 4); kept apart from paths.ts while the assets work is open in the same tree. */
export const FINDING_API = {
  /** `?programId=&assetId=&mine=&severity=&status=&system=&ownerId=&overdue=&sort=&dir=&cursor=&limit=` */
  findings: '/api/findings',
  finding: (id: string) => `/api/findings/${id}`,
  findingComments: (id: string) => `/api/findings/${id}/comments`,
  /** multipart, field `photo` */
  findingPhotos: (id: string) => `/api/findings/${id}/photos`,
  findingHistory: (id: string) => `/api/findings/${id}/history`,
  emailPrefs: '/api/me/email-prefs',
} as const;

/** Plain sentences for the finding error codes (the server's message is usually the better one). */
export const FINDING_ERROR_SENTENCES: Record<string, string> = {
  'finding/invalid-transition': 'A finding cannot make that move.',
  'finding/transition-forbidden': 'Your role cannot make that move on this finding.',
  'finding/edit-forbidden': 'Only the finding’s creator, its owner, an engineer or a lead can change that.',
  'request/idempotency-mismatch': 'This was already sent with other content. Try again.',
  'request/in-progress': 'The first try of this is still being saved. Try again in a moment.',
};
