import { z } from 'zod';

/** The one error body the API answers with: `{ error: { code: 'area/reason', message, details? } }`. */
export const ErrorBodySchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});
export type ErrorBody = z.infer<typeof ErrorBodySchema>;

/** Plain sentences for codes the client may meet without a server message. */
export const ERROR_SENTENCES: Record<string, string> = {
  'auth/invalid-credentials': 'That e-mail and password do not match an account.',
  'auth/too-many-attempts': 'Too many failed sign-ins. Wait a few minutes and try again.',
  'auth/unauthenticated': 'Your session has ended. Please sign in again.',
  'auth/forbidden': 'Your role does not allow this.',
  'request/invalid': 'Some fields need attention.',
  'request/not-found': 'This item does not exist or is not in your programs.',
  'request/conflict': 'Someone else changed this first. Review the latest version.',
  'request/duplicate': 'This value is already in use.',
  'stage/in-use': 'Assets are on this stage or passed through it: retire it instead of deleting it.',
  'stage/retired': 'This stage is retired: choose another.',
  'checklist/closed': 'This checklist belongs to a stage the asset has left; it can be read, not changed.',
  'upload/unsupported-type': 'Only photos are accepted: JPEG, PNG, WebP or HEIC.',
  'upload/too-large': 'The photo is too large. Try a smaller one.',
  'upload/too-many-pixels': 'The photo has too many pixels. Try a smaller one.',
  'upload/idempotency-key-reused': 'This upload was already sent with other content. Try again.',
  'photo/link-invalid': 'This photo link has expired. Reload the page.',
  'service/unavailable': 'Proofyard cannot reach its database right now. Try again in a moment.',
  'network/offline': 'No connection. Check your network and try again.',
  'server/internal': 'Something went wrong on our side. Try again.',
};

export function sentenceFor(code: string, fallback?: string): string {
  return fallback ?? ERROR_SENTENCES[code] ?? ERROR_SENTENCES['server/internal'];
}
