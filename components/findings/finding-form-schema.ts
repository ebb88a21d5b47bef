import { z } from 'zod';
import { SystemSchema } from '@/shared/schemas/assets';
import { CreateFindingSchema, DueDateSchema, FindingSeveritySchema, type CreateFinding, type FindingSeverity } from '@/shared/schemas/findings';

/**
 * The capture form: the shared create schema's fields as a form holds them (empty text for "no
 * due date", null before a severity is chosen). `toCreateFinding` turns it into the API body.
 */
export const FindingFormSchema = z.object({
  title: CreateFindingSchema.shape.title,
  severity: FindingSeveritySchema.nullable().refine((value) => value !== null, 'Choose how serious it is.'),
  description: z.string().trim().max(4000, 'Use at most 4000 characters.'),
  system: SystemSchema.nullable(),
  ownerId: z.string().nullable(),
  dueDate: z.union([z.literal(''), DueDateSchema]),
  watcherIds: z.array(z.string()),
});
export type FindingFormInput = z.input<typeof FindingFormSchema>;
export type FindingFormValues = z.output<typeof FindingFormSchema>;

export const EMPTY_FINDING_FORM: FindingFormInput = {
  title: '',
  severity: null,
  description: '',
  system: null,
  ownerId: null,
  dueDate: '',
  watcherIds: [],
};

export function toCreateFinding(values: FindingFormValues, assetId: string, checklistItemId?: string): CreateFinding {
  return {
    assetId,
    title: values.title,
    severity: values.severity as FindingSeverity,
    ...(values.description ? { description: values.description } : {}),
    ...(values.system ? { system: values.system } : {}),
    ...(values.ownerId ? { ownerId: values.ownerId } : {}),
    ...(values.dueDate ? { dueDate: values.dueDate } : {}),
    ...(values.watcherIds.length ? { watcherIds: values.watcherIds } : {}),
    ...(checklistItemId ? { checklistItemId } : {}),
  };
}
