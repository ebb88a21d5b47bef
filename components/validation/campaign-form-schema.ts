import { z } from 'zod';
import { condensationRisks, dewPoint, humidityProblem, temperatureProblem } from '@/shared/domain/dew-point';
import { CampaignKindSchema, CreateCampaignSchema, type Campaign, type CampaignKindValue, type CreateCampaign } from '@/shared/schemas/validation';
import { readNumber } from './validation-words';

/**
 * The campaign form holds numbers as typed text. Each is read here (blank means "not given"),
 * then the whole is checked by the shared CreateCampaignSchema, whose issue paths
 * (`steps.2.durationHours`) are the form's field names.
 */
const numberText = z
  .string()
  .refine((value) => !Number.isNaN(readNumber(value) ?? 0), 'Enter a number, or leave it empty.')
  .transform((value) => readNumber(value));

const StepTextSchema = z.object({
  /** The saved step's id (its hours and km done stay with it); empty for a new step. */
  stepId: z.string(),
  name: z.string(),
  durationHours: numberText,
  distanceKm: numberText,
  temperatureC: numberText,
  humidityPct: numberText,
  route: z.string(),
});

export const CampaignFormSchema = z
  .object({
    name: z.string(),
    kind: CampaignKindSchema,
    steps: z.array(StepTextSchema),
  })
  .transform((v): CreateCampaign => ({
    name: v.name,
    kind: v.kind,
    steps: v.steps.map((s) => ({
      ...(s.stepId ? { id: s.stepId } : {}),
      name: s.name,
      durationHours: s.durationHours,
      distanceKm: v.kind === 'durability' ? s.distanceKm : null,
      temperatureC: v.kind === 'climate' ? s.temperatureC : null,
      humidityPct: v.kind === 'climate' ? s.humidityPct : null,
      route: v.kind === 'durability' && s.route.trim() ? s.route.trim() : null,
    })),
  }))
  .pipe(CreateCampaignSchema);

export type CampaignFormInput = z.input<typeof CampaignFormSchema>;
export type CampaignFormOutput = z.output<typeof CampaignFormSchema>;
export type StepText = z.input<typeof StepTextSchema>;

export const emptyStep = (): StepText => ({ stepId: '', name: '', durationHours: '', distanceKm: '', temperatureC: '', humidityPct: '', route: '' });

export function emptyCampaignForm(kind: CampaignKindValue = 'climate'): CampaignFormInput {
  return { name: '', kind, steps: [emptyStep()] };
}

const text = (v: number | null) => (v === null ? '' : String(v));

export function campaignFormValues(campaign: Campaign): CampaignFormInput {
  return {
    name: campaign.name,
    kind: campaign.kind,
    steps: campaign.steps.map((s) => ({
      stepId: s.id,
      name: s.name,
      durationHours: text(s.durationHours),
      distanceKm: text(s.distanceKm),
      temperatureC: text(s.temperatureC),
      humidityPct: text(s.humidityPct),
      route: s.route ?? '',
    })),
  };
}

export type StepPreview = { dewPoint: number | null; caution: string | null };

/** Dew point and condensation caution per step for what is typed so far (the shared functions the server runs). */
export function previewSteps(steps: readonly StepText[]): StepPreview[] {
  const read = (v: string) => {
    const n = readNumber(v);
    return n === null || Number.isNaN(n) ? null : n;
  };
  const climate = steps.map((s) => ({ name: s.name.trim() || 'unnamed', temperatureC: read(s.temperatureC), humidityPct: read(s.humidityPct) }));
  const risks = condensationRisks(climate);
  return climate.map((s, i) => {
    const ok = s.temperatureC !== null && s.humidityPct !== null && !temperatureProblem('t', s.temperatureC) && !humidityProblem('h', s.humidityPct);
    return { dewPoint: ok ? dewPoint(s.temperatureC as number, s.humidityPct as number) : null, caution: risks[i] };
  });
}
