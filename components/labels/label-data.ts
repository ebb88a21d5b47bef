/** What one printed label shows. */
export type LabelData = {
  id: string;
  tag: string;
  url: string;
  programCode: string;
  programName: string;
  stage: string;
};

/** A4 sheet of 3 x 8 labels, 70 x 37.125 mm each, without margins (the common "24 per sheet" stock). */
export const SHEET = { columns: 3, rows: 8, labelWidthMm: 70, labelHeightMm: 37.125 } as const;
export const LABELS_PER_SHEET = SHEET.columns * SHEET.rows;
