/**
 * Mutation keys of the changes that wait on the device while it is offline. Only mutations under
 * `queue` are persisted and resumed after a reload; each has defaults (its mutationFn) registered
 * on the query client, so a restored mutation knows how to send itself.
 */
export const queueKeys = {
  all: ['queue'] as const,
  findingCreate: () => [...queueKeys.all, 'finding-create'] as const,
  findingComment: () => [...queueKeys.all, 'finding-comment'] as const,
  checklistItem: () => [...queueKeys.all, 'checklist-item'] as const,
};

export function isQueuedKey(key: readonly unknown[] | undefined): boolean {
  return key?.[0] === queueKeys.all[0];
}
