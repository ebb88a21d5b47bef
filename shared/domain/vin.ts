import type { VinCheck } from '../schemas/assets';

/** 49 CFR 565.15(c), Table III: the value of each letter (digits are their own value). I, O and Q are not used. */
const TRANSLITERATION: Record<string, number> = {
  A: 1, B: 2, C: 3, D: 4, E: 5, F: 6, G: 7, H: 8,
  J: 1, K: 2, L: 3, M: 4, N: 5, P: 7, R: 9,
  S: 2, T: 3, U: 4, V: 5, W: 6, X: 7, Y: 8, Z: 9,
};

/** 49 CFR 565.15(c), Table IV: the weight of each position, 1 to 17 (the check digit itself weighs 0). */
const WEIGHTS = [8, 7, 6, 5, 4, 3, 2, 10, 0, 9, 8, 7, 6, 5, 4, 3, 2];

/**
 * Position-10 model-year codes (the model-year table of 49 CFR 565.15, as summarised in
 * shared REFERENCES.md): A = 1980 ... Y = 2000, then 1 to 9 = 2001 to 2009; the cycle repeats
 * every 30 years. I, O, Q, U, Z and 0 are not used.
 */
const YEAR_CODES = 'ABCDEFGHJKLMNPRSTVWXY123456789';

export const VIN_LENGTH = 17;

function valueOf(char: string): number {
  if (char >= '0' && char <= '9') return Number(char);
  return TRANSLITERATION[char] ?? 0;
}

/** The check digit a 17-character VIN should carry in position 9 ('0'-'9' or 'X' for a remainder of 10). */
export function expectedCheckDigit(vin: string): string {
  let sum = 0;
  for (let i = 0; i < VIN_LENGTH; i += 1) sum += valueOf(vin[i]) * WEIGHTS[i];
  const remainder = sum % 11;
  return remainder === 10 ? 'X' : String(remainder);
}

/** Both model years a position-10 code can stand for (the code repeats every 30 years), oldest first; [] for a code not in use. */
export function modelYearsFor(code: string): number[] {
  const index = code.length === 1 ? YEAR_CODES.indexOf(code) : -1;
  if (index < 0) return [];
  return [1980 + index, 2010 + index];
}

/**
 * Checks a VIN as typed (upper-casing and removing spaces is the input schema's job).
 * Structure per ISO 3779: WMI in positions 1-3, VDS 4-9 (with the check digit in 9), VIS 10-17.
 * A wrong check digit is reported, not refused: it is a North American requirement and prototypes
 * may carry internal numbers.
 */
export function checkVin(vin: string): VinCheck {
  const problems: string[] = [];
  if (vin.length !== VIN_LENGTH) {
    problems.push(`A VIN has ${VIN_LENGTH} characters; this one has ${vin.length}.`);
  }
  const iOq = [...vin].map((c, i) => ({ c, at: i + 1 })).filter(({ c }) => c === 'I' || c === 'O' || c === 'Q');
  if (iOq.length) {
    problems.push(
      `The letters I, O and Q are never used in a VIN (found ${iOq.map(({ c, at }) => `${c} at position ${at}`).join(', ')}).`,
    );
  }
  const other = [...vin].map((c, i) => ({ c, at: i + 1 })).filter(({ c }) => !/^[A-Z0-9]$/.test(c));
  if (other.length) {
    problems.push(
      `Only capital letters and digits are allowed (found ${other.map(({ c, at }) => `"${c}" at position ${at}`).join(', ')}).`,
    );
  }
  const wellFormed = problems.length === 0;
  const expected = wellFormed ? expectedCheckDigit(vin) : null;
  return {
    wellFormed,
    checkDigitValid: wellFormed && vin[8] === expected,
    expectedCheckDigit: expected,
    modelYears: vin.length >= 10 ? modelYearsFor(vin[9]) : [],
    sections: { wmi: vin.slice(0, 3), vds: vin.slice(3, 9), vis: vin.slice(9, 17) },
    problems,
  };
}

/** Puts the right check digit into position 9 of a 17-character VIN (for invented demo VINs). */
export function withCheckDigit(vin: string): string {
  return `${vin.slice(0, 8)}${expectedCheckDigit(vin)}${vin.slice(9)}`;
}
