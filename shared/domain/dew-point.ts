// Dew point by the Magnus formula with the coefficients of Alduchov and Eskridge (1996),
// REFERENCES.md: gamma = ln(RH/100) + a T / (b + T); Td = b gamma / (a - gamma),
// a = 17.625, b = 243.04 degC. It is the dew point over liquid water. Below 0 degC the frost
// point (over ice) lies higher, by about a degree near -10 degC, so a frost caution there is a
// guide, not a limit.

import type { InputProblem } from './reliability';

export const MAGNUS_A = 17.625;
export const MAGNUS_B_C = 243.04;
export const TEMPERATURE_MIN_C = -100;
export const TEMPERATURE_MAX_C = 200;
/** The range the coefficients were fitted for (Alduchov and Eskridge, 1996, -40 to 50 degC); outside it the value is an extrapolation. */
export const MAGNUS_FIT_MIN_C = -40;
export const MAGNUS_FIT_MAX_C = 50;

export class DewPointInputError extends Error {
  constructor(
    readonly field: 'temperature' | 'humidity',
    message: string,
  ) {
    super(`${field}: ${message}`);
  }
}

const isNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);

export function temperatureProblem(field: string, value: unknown): InputProblem | null {
  if (!isNumber(value)) return { field, message: 'Enter a temperature in degrees Celsius.' };
  if (value < TEMPERATURE_MIN_C || value > TEMPERATURE_MAX_C) {
    return { field, message: `Must be between ${TEMPERATURE_MIN_C} and ${TEMPERATURE_MAX_C} °C.` };
  }
  return null;
}

export function humidityProblem(field: string, value: unknown): InputProblem | null {
  if (!isNumber(value)) return { field, message: 'Enter a relative humidity in percent.' };
  if (value <= 0 || value > 100) return { field, message: 'Must be more than 0 and at most 100 %.' };
  return null;
}

/** Dew point in degC of air at `temperatureC` and `humidityPct` relative humidity (over water). */
export function dewPoint(temperatureC: number, humidityPct: number): number {
  const t = temperatureProblem('temperature', temperatureC);
  if (t) throw new DewPointInputError('temperature', t.message);
  const h = humidityProblem('humidity', humidityPct);
  if (h) throw new DewPointInputError('humidity', h.message);
  const gamma = Math.log(humidityPct / 100) + (MAGNUS_A * temperatureC) / (MAGNUS_B_C + temperatureC);
  return (MAGNUS_B_C * gamma) / (MAGNUS_A - gamma);
}

/** A plain caution to show beside a dew point, or null. */
export function dewPointNote(temperatureC: number, dewPointC: number): string | null {
  if (temperatureC < MAGNUS_FIT_MIN_C || temperatureC > MAGNUS_FIT_MAX_C) {
    return `The Magnus coefficients are fitted for ${MAGNUS_FIT_MIN_C} to ${MAGNUS_FIT_MAX_C} °C; at ${temperatureC} °C the value is an extrapolation.`;
  }
  if (dewPointC < 0) return 'Below 0 °C this is the dew point over water; the frost point over ice is about a degree higher.';
  return null;
}

export type ClimateStep = { name: string; temperatureC: number | null; humidityPct: number | null };

export const roundTo = (value: number, digits: number) => {
  const f = 10 ** digits;
  return Math.round(value * f) / f;
};

const fmt = (v: number) => `${roundTo(v, 1)} °C`;

/**
 * Condensation cautions per step (null where there is none), in step order:
 * - a later, colder step: its temperature is below the dew point of an earlier humid step, so
 *   moisture taken up then can condense on the part (the highest earlier dew point is named);
 * - a cold part: a humid step whose dew point is above the temperature the part comes from
 *   (the last earlier step with a temperature), so water condenses on it until it warms up.
 * A step without a temperature (a ramp may have none) is skipped; give a ramp its end temperature.
 */
export function condensationRisks(steps: readonly ClimateStep[]): Array<string | null> {
  const dew = steps.map((s) =>
    s.temperatureC !== null && s.humidityPct !== null && !temperatureProblem('t', s.temperatureC) && !humidityProblem('h', s.humidityPct)
      ? dewPoint(s.temperatureC, s.humidityPct)
      : null,
  );
  let worst: { index: number; dewPoint: number } | null = null;
  let lastTemperature: number | null = null;
  return steps.map((step, j) => {
    const cautions: string[] = [];
    const t = step.temperatureC;
    if (t !== null && worst && t < worst.dewPoint) {
      cautions.push(
        `At ${fmt(t)} this step is below the ${fmt(worst.dewPoint)} dew point of the earlier step "${steps[worst.index].name}": moisture taken up then can condense on the part.`,
      );
    }
    const own = dew[j];
    if (own !== null && lastTemperature !== null && lastTemperature < own) {
      cautions.push(`A part coming from ${fmt(lastTemperature)} is below this step's ${fmt(own)} dew point: water condenses on it until it warms up.`);
    }
    const iceTemperature = cautions.length ? Math.min(t ?? Infinity, lastTemperature ?? Infinity) : Infinity;
    if (iceTemperature < 0) cautions.push('Below 0 °C the moisture freezes as frost; the frost point over ice differs by about a degree.');
    if (own !== null && (!worst || own > worst.dewPoint)) worst = { index: j, dewPoint: own };
    if (t !== null) lastTemperature = t;
    return cautions.length ? cautions.join(' ') : null;
  });
}
