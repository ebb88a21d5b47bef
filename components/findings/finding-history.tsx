import { Timeline } from '@/components/history/timeline';
import { useFindingHistoryQuery } from '@/hooks/queries/findings';
import { describeFindingEntry } from './finding-history-words';

/** The finding's append-only history, newest first: who, when, what, and each field's before -> after. */
export function FindingHistory({ findingId }: { findingId: string }) {
  const history = useFindingHistoryQuery(findingId);
  return (
    <Timeline
      history={history}
      describe={describeFindingEntry}
      testID="finding-history"
      rowTestID={(entry) => `finding-history-${entry.id}`}
      pausedMessage="The history shows when the connection is back."
    />
  );
}
