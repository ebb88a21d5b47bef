import type { BadgeTone } from '@/components/ui/chip';
import { errorMessage, isApiError } from '@/hooks/api/api-client';
import { VALIDATION_ERROR_SENTENCES } from '@/shared/api/validation-paths';
import { demonstratedReliability, sampleSizeProblems, successRunSampleSize, type InputProblem } from '@/shared/domain/reliability';
import type { Role } from '@/shared/schemas/auth';
import { REPORT_MAX_BYTES, type TestStatus } from '@/shared/schemas/validation';

/** Who may press what: the same role lists as server/routes/validation.ts; it only hides controls. */
const rule = (...roles: Role[]) => (role: Role | null | undefined) => Boolean(role && roles.includes(role));
export const canValidation = {
  planTests: rule('engineer', 'lead'),
  recordResults: rule('technician', 'engineer', 'lead'),
  workCampaigns: rule('technician', 'engineer', 'lead'),
};

export const TEST_STATUS_LABELS: Record<TestStatus, string> = {
  planned: 'Planned',
  running: 'Running',
  passed: 'Passed',
  failed: 'Failed',
};

export const TEST_STATUS_TONES: Record<TestStatus, BadgeTone> = {
  planned: 'neutral',
  running: 'primary',
  passed: 'success',
  failed: 'danger',
};

/** At most `digits` decimals, without trailing zeros: 0.9 -> "0.9", 21.854 -> "21.85". */
export function formatNumber(value: number, digits = 2): string {
  const f = 10 ** digits;
  return String(Math.round(value * f) / f);
}

/** A fraction as a percentage: 0.9 -> "90 %", 0.995 -> "99.5 %". */
export function formatPercent(fraction: number, digits = 2): string {
  return `${formatNumber(fraction * 100, digits)} %`;
}

/** "n = 22 (21.85 before rounding up)", or "n = 20" when nothing was rounded. */
export function sampleSizeSentence(n: number, exact: number): string {
  if (Math.abs(exact - n) < 1e-9) return `n = ${n}`;
  return `n = ${n} (${formatNumber(exact)} before rounding up)`;
}

/**
 * A number typed by a person: blank is "not given" (null); a decimal comma reads like a point
 * ("0,9" is 0.9); anything else that is not a number is NaN, which the checks turn into a sentence.
 */
export function readNumber(text: string): number | null {
  const trimmed = text.trim().replace(',', '.');
  if (trimmed === '') return null;
  return /^[+-]?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/i.test(trimmed) ? Number(trimmed) : Number.NaN;
}

export type SampleSizeTexts = { reliability: string; confidence: string; testToLife: string; shape: string };

export type SampleSizePreview =
  | {
      ok: true;
      n: number;
      exact: number;
      /** (1-C)^(1/(n L^b)) after n passes with no failure. */
      demonstrated: number;
      reliability: number;
      confidence: number;
      testToLife: number | null;
      shape: number | null;
    }
  | { ok: false; problems: InputProblem[] };

/** The live preview of the shared success-run computation for what is typed so far. */
export function previewSampleSize(texts: SampleSizeTexts): SampleSizePreview {
  const input = {
    reliability: readNumber(texts.reliability) ?? Number.NaN,
    confidence: readNumber(texts.confidence) ?? Number.NaN,
    testToLife: readNumber(texts.testToLife),
    shape: readNumber(texts.shape),
  };
  const problems = sampleSizeProblems(input);
  if (problems.length) return { ok: false, problems };
  try {
    const { n, exact } = successRunSampleSize(input);
    const demonstrated = demonstratedReliability(n, input.confidence, { testToLife: input.testToLife, shape: input.shape });
    return { ok: true, n, exact, demonstrated, ...input };
  } catch (error) {
    return { ok: false, problems: [{ field: 'reliability', message: error instanceof Error ? error.message.replace(/^\w+: /, '') : 'Check the values.' }] };
  }
}

export const SAMPLE_SIZE_FORMULA = 'n = ln(1 − C) / ln(R), rounded up';
export const SAMPLE_SIZE_FORMULA_WEIBULL = 'n = ln(1 − C) / (L^b · ln R), rounded up';

/** The report a technician may attach: a PDF or a picture, at most 20 MB (the server checks the bytes as well). */
export const REPORT_TYPES = ['application/pdf', 'image/jpeg', 'image/png', 'image/webp', 'image/heic', 'image/heif'];

export function reportProblem(file: { name: string; type: string; size: number | null }): string | null {
  const type = file.type.toLowerCase();
  const byName = /\.(pdf|jpe?g|png|webp|hei[cf])$/i.test(file.name);
  if (type ? !REPORT_TYPES.includes(type) && !(type === 'application/octet-stream' && byName) : !byName) {
    return 'A report must be a PDF or a picture (JPEG, PNG, WebP or HEIC).';
  }
  if (file.size !== null && file.size > REPORT_MAX_BYTES) {
    return `The report is larger than ${REPORT_MAX_BYTES / 1024 / 1024} MB. Send a smaller one.`;
  }
  return null;
}

/**
 * The sentence for a failed report upload: a 413 or 415 carries a whole sentence from the server
 * (better than its one-word field note), else the plain sentence of the code.
 */
export function reportErrorMessage(error: unknown): string {
  if (isApiError(error) && (error.status === 413 || error.status === 415 || error.code.startsWith('upload/'))) {
    const message = error.message.trim();
    if (message && message.length <= 300 && !/^[a-z-]+\/[a-z-]+$/.test(message)) return message;
    return VALIDATION_ERROR_SENTENCES[error.code] ?? (error.status === 413 ? VALIDATION_ERROR_SENTENCES['upload/too-large'] : VALIDATION_ERROR_SENTENCES['upload/unsupported-type']);
  }
  return validationErrorMessage(error);
}

/** Plain sentences for the validation codes; anything else as every other screen says it. */
export function validationErrorMessage(error: unknown): string {
  if (isApiError(error) && error.status === 409 && error.code !== 'validation/already-allocated' && error.code !== 'validation/test-name-taken') {
    return 'Someone else changed this first. The latest version is shown; check it and try again.';
  }
  return errorMessage(error, VALIDATION_ERROR_SENTENCES);
}

const dateFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric' });
const dateTimeFormat = new Intl.DateTimeFormat('en-GB', { day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' });

export function formatDate(value: string | null | undefined): string {
  if (!value) return '—';
  const date = new Date(value);
  return Number.isNaN(date.getTime()) ? value : dateFormat.format(date);
}

export function formatDateTime(value: string | null | undefined): string {
  if (!value) return '—';
  const date = new Date(value);
  return Number.isNaN(date.getTime()) ? value : dateTimeFormat.format(date);
}

/** "48 h", "1,200 km" (three decimals at most, as the server keeps them). */
export function formatAmount(value: number, unit: 'hours' | 'km'): string {
  const shown = (Math.round(value * 1000) / 1000).toLocaleString('en-GB', { maximumFractionDigits: 3 });
  return unit === 'hours' ? `${shown} h` : `${shown} km`;
}

export function formatTemperature(value: number): string {
  return `${formatNumber(value, 1)} °C`;
}
