import type { LabelData } from './label-data';

/** Printing needs a browser; on a phone app the preview is all there is. */
export const canPrint = false;

export function PrintSheet(_props: { labels: readonly LabelData[] }) {
  return null;
}

export function printLabels() {}
