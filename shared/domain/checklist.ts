import type { ChecklistProgress, ItemState } from '../schemas/assets';

/** Done means passed or not applicable (PRODUCT.md section 4, part C); deviations are counted apart. */
export const DONE_STATES: readonly ItemState[] = ['passed', 'not-applicable'];

export function checklistProgress(items: ReadonlyArray<{ state: ItemState; requiredForGate: boolean }>): ChecklistProgress {
  const progress = { total: 0, done: 0, requiredTotal: 0, requiredDone: 0, deviations: 0 };
  for (const item of items) {
    const done = DONE_STATES.includes(item.state);
    progress.total += 1;
    if (done) progress.done += 1;
    if (item.requiredForGate) {
      progress.requiredTotal += 1;
      if (done) progress.requiredDone += 1;
    }
    if (item.state === 'deviation') progress.deviations += 1;
  }
  return progress;
}
