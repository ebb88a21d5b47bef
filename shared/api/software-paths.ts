/** API paths of ECU software configuration (issue 5); kept apart from paths.ts while other work is open in the same tree. */
export const SOFTWARE_API = {
  /** `?installed=&target=&range=` -> VersionCompareSchema */
  versionCompare: '/api/calc/version-compare',
  /** GET `?programId=`, POST CreateEcuSchema */
  ecus: '/api/ecus',
  /** PATCH UpdateEcuSchema */
  ecu: (id: string) => `/api/ecus/${id}`,
  /** GET `?programId=&stageId=&status=`, POST CreateBaselineSchema */
  baselines: '/api/baselines',
  /** GET, PATCH UpdateBaselineSchema (draft only), DELETE (draft only) */
  baseline: (id: string) => `/api/baselines/${id}`,
  /** POST ReleaseBaselineSchema */
  baselineRelease: (id: string) => `/api/baselines/${id}/release`,
  baselineDiff: (fromId: string, toId: string) => `/api/baselines/${fromId}/diff/${toId}`,
  /** GET -> AssetSoftwareSchema */
  assetSoftware: (assetId: string) => `/api/assets/${assetId}/software`,
  /** PUT RecordFlashSchema -> AssetSoftwareSchema */
  assetSoftwareEcu: (assetId: string, ecuId: string) => `/api/assets/${assetId}/software/${ecuId}`,
  /** multipart (field `file`, plus `programId`, `skipInvalid`) or JSON ImportBodySchema */
  importPreview: '/api/software/import/preview',
  importApply: '/api/software/import/apply',
  /** `?programId=&stageId=&status=&ecuId=&cursor=&limit=` */
  matrix: '/api/software/matrix',
  /** `?programId=&stageId=&ecuId=&before=YYYY-MM-DD&testId=` */
  reflash: '/api/software/reflash',
  reflashCsv: '/api/software/reflash.csv',
  /** POST ReflashDoneSchema -> AssetSoftwareSchema */
  reflashDone: '/api/software/reflash/done',
} as const;

/** Plain sentences for the software error codes (the server's message is usually the better one). */
export const SOFTWARE_ERROR_SENTENCES: Record<string, string> = {
  'baseline/read-only': 'A released baseline cannot be changed. Start a new draft from it.',
  'baseline/empty': 'Give at least one ECU a target version before releasing.',
  'ecu/code-taken': 'Another ECU of this program has this code.',
  'import/unsupported-type': 'Send the read-out as a CSV or JSON file.',
  'import/too-large': 'The read-out is larger than 2 MB. Split it and import each part.',
  'import/missing-columns': 'The read-out lacks a column Proofyard needs (asset tag or VIN, ECU, software version).',
  'import/duplicate-columns': 'Two columns of the read-out give the same value. Keep one.',
  'import/malformed': 'The read-out does not parse.',
  'import/empty': 'The read-out has no rows.',
  'import/too-many-rows': 'The read-out has too many rows. Split it and import each part.',
  'import/invalid-rows': 'Nothing was imported: some rows cannot be. Correct them or choose to skip them.',
};
