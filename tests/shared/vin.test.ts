import { checkVin, expectedCheckDigit, modelYearsFor, withCheckDigit } from '../../shared/domain/vin';
import { VinInputSchema } from '../../shared/schemas/assets';

// Values (49 CFR 565.15(c), Table III): A-H 1-8, J-N 1-5, P 7, R 9, S-Z 2-9; digits are themselves.
// Weights (Table IV): 8 7 6 5 4 3 2 10 0 9 8 7 6 5 4 3 2. Check digit = sum mod 11, 10 written X.
//
// 1G4AH59H45G118341, recomputed by hand:
//   values   1 7 4 1 8 5 9 8 - 5 7 1 1 8 3 4 1
//   products 8 49 24 5 32 15 18 80 0 45 56 7 6 40 12 12 2 = 411; 411 = 37 x 11 + 4 -> check digit 4.
// 1M8GDM9AXKP042788, recomputed by hand:
//   values   1 4 8 7 4 4 9 1 - 2 7 0 4 2 7 8 8
//   products 8 28 48 35 16 12 18 10 0 18 56 0 24 10 28 24 16 = 351; 351 = 31 x 11 + 10 -> X.
// 1FTDX186XWKA10140, recomputed by hand:
//   values   1 6 3 4 7 1 8 6 - 6 2 1 1 0 1 4 0
//   products 8 42 18 20 28 3 16 60 0 54 16 7 6 0 4 12 0 = 294; 294 = 26 x 11 + 8 -> 8, but the VIN carries X.
describe('VIN check digit (49 CFR 565.15(c); worked examples in shared REFERENCES.md)', () => {
  it.each([
    ['1G4AH59H45G118341', '4', true, '49 CFR 565.15(c), the regulation\'s own sample'],
    ['1M8GDM9AXKP042788', 'X', true, 'REFERENCES.md, a remainder of 10 written X'],
    ['1FTDX186XWKA10140', '8', false, 'REFERENCES.md, invalid: the digit should be 8'],
  ])('when %s is checked, then the expected check digit is %s (valid: %s; source: %s)', (vin, expected, valid) => {
    const result = checkVin(vin);
    expect(result.wellFormed).toBe(true);
    expect(result.expectedCheckDigit).toBe(expected);
    expect(result.checkDigitValid).toBe(valid);
    expect(result.problems).toEqual([]);
    expect(expectedCheckDigit(vin)).toBe(expected);
  });

  it('when a check digit is put into an invented VIN, then the VIN checks valid (round trip of the same rule)', () => {
    const vin = withCheckDigit('0FWC3ED1_TB000123'.replace('_', '0'));
    expect(checkVin(vin).checkDigitValid).toBe(true);
  });
});

describe('malformed VINs are not well formed and say why (49 CFR 565.15; ISO 3779: 17 characters, no I, O, Q)', () => {
  it.each([
    ['16 characters', '1G4AH59H45G11834', /17 characters; this one has 16/],
    ['18 characters', '1G4AH59H45G1183410', /17 characters; this one has 18/],
    ['the letter I', '1G4AH59I45G118341', /I at position 8/],
    ['the letter O', 'OG4AH59H45G118341', /O at position 1/],
    ['the letter Q', '1G4AH59H45G11834Q', /Q at position 17/],
    ['a dash', '1G4AH-9H45G118341', /"-" at position 6/],
    ['lower case (the input schema upper-cases first)', '1g4ah59h45g118341', /capital letters and digits/],
  ])('when a VIN has %s, then wellFormed is false and the problem is named', (_label, vin, problem) => {
    const result = checkVin(vin);
    expect(result.wellFormed).toBe(false);
    expect(result.checkDigitValid).toBe(false);
    expect(result.expectedCheckDigit).toBeNull();
    expect(result.problems.join(' ')).toMatch(problem);
  });

  it('when several things are wrong, then each is listed', () => {
    expect(checkVin('IOQ').problems).toHaveLength(2);
  });

  it('when a VIN is typed in lower case with spaces, then the input schema normalises it before the check', () => {
    const typed = VinInputSchema.parse(' 1g4ah59h4 5g118341 ');
    expect(typed).toBe('1G4AH59H45G118341');
    expect(checkVin(typed).checkDigitValid).toBe(true);
  });
});

describe('model year from position 10 (49 CFR 565.15 model-year table, as summarised in REFERENCES.md)', () => {
  it.each([
    ['A', [1980, 2010]],
    ['H', [1987, 2017]],
    ['J', [1988, 2018]],
    ['P', [1993, 2023]],
    ['Y', [2000, 2030]],
    ['1', [2001, 2031]],
    ['5', [2005, 2035]],
    ['9', [2009, 2039]],
    ['T', [1996, 2026]],
  ])('when the code is %s, then the model years are %j', (code, years) => {
    expect(modelYearsFor(code)).toEqual(years);
  });

  it.each(['I', 'O', 'Q', 'U', 'Z', '0'])('when the code is %s (not used), then no model year is given', (code) => {
    expect(modelYearsFor(code)).toEqual([]);
  });

  it('when a whole VIN is checked, then its position-10 code gives the years (1G4AH59H45G118341: 5 -> 2005 or 2035)', () => {
    expect(checkVin('1G4AH59H45G118341').modelYears).toEqual([2005, 2035]);
  });
});

describe('sections (ISO 3779: WMI 1-3, VDS 4-9, VIS 10-17)', () => {
  it.each([
    ['1G4AH59H45G118341', { wmi: '1G4', vds: 'AH59H4', vis: '5G118341' }],
    ['1M8GDM9AXKP042788', { wmi: '1M8', vds: 'GDM9AX', vis: 'KP042788' }],
  ])('when %s is split, then the sections are %j', (vin, sections) => {
    expect(checkVin(vin).sections).toEqual(sections);
  });
});
