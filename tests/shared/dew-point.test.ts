import { condensationRisks, dewPoint, dewPointNote, DewPointInputError } from '../../shared/domain/dew-point';

// Magnus formula, coefficients of Alduchov and Eskridge (1996): a = 17.625, b = 243.04 degC;
// gamma = ln(RH/100) + a T / (b + T); Td = b gamma / (a - gamma).
describe('dewPoint', () => {
  it.each([
    // REFERENCES.md (Magnus / Alduchov-Eskridge): 20 degC, 50 %RH -> 9.26 degC.
    // By hand: gamma = ln(0.5) + 352.5 / 263.04 = -0.693147 + 1.340100 = 0.646953; Td = 243.04 x 0.646953 / 16.978047 = 9.261.
    { source: 'REFERENCES.md', t: 20, rh: 50, td: 9.26 },
    // A calculator built on the same coefficients, quoted in an Earth Science Stack Exchange question
    // ("dew point 70 degF and relative humidity 90 % results in a temperature of 73.11 degF"): 73.11 degF = 22.839 degC,
    // 70 degF = 21.111 degC. By hand: gamma = ln(0.9) + 402.535 / 265.879 = -0.105361 + 1.513979 = 1.408618;
    // Td = 243.04 x 1.408618 / 16.216382 = 21.111.
    { source: 'Earth Science Stack Exchange (Magnus calculator example)', t: ((73.11 - 32) * 5) / 9, rh: 90, td: (70 - 32) * (5 / 9) },
    // From memory (common dew point tables): 25 degC, 60 %RH -> 16.7 degC.
    // By hand: gamma = ln(0.6) + 440.625 / 268.04 = -0.510826 + 1.643878 = 1.133052; Td = 243.04 x 1.133052 / 16.491948 = 16.698.
    { source: 'from memory (dew point tables)', t: 25, rh: 60, td: 16.7 },
    // From memory (common dew point tables): 30 degC, 80 %RH -> 26.2 degC.
    // By hand: gamma = ln(0.8) + 528.75 / 273.04 = -0.223144 + 1.936529 = 1.713385; Td = 243.04 x 1.713385 / 15.911615 = 26.171.
    { source: 'from memory (dew point tables)', t: 30, rh: 80, td: 26.17 },
    // Recomputed by hand (the demo's damp heat step): gamma = ln(0.85) + 705 / 283.04 = -0.162519 + 2.490814 = 2.328295;
    // Td = 243.04 x 2.328295 / 15.296705 = 36.993.
    { source: 'recomputed by hand', t: 40, rh: 85, td: 36.99 },
    // Recomputed by hand, below 0 degC (over water): gamma = ln(0.8) - 176.25 / 233.04 = -0.223144 - 0.756308 = -0.979452;
    // Td = 243.04 x -0.979452 / 18.604452 = -12.795.
    { source: 'recomputed by hand', t: -10, rh: 80, td: -12.8 },
  ])('when $t degC at $rh %RH ($source), then the dew point is $td degC', ({ t, rh, td }) => {
    expect(dewPoint(t, rh)).toBeCloseTo(td, 1);
  });

  it('when the REFERENCES.md case is read to two decimals, then it is 9.26', () => {
    expect(Math.round(dewPoint(20, 50) * 100) / 100).toBe(9.26);
  });

  it.each([-40, -20, 0, 23, 40, 85])('when the air at %p degC is saturated (100 %RH), then the dew point is the air temperature (gamma = aT/(b+T))', (t) => {
    expect(dewPoint(t, 100)).toBeCloseTo(t, 10);
  });

  it('when the humidity falls, then the dew point falls', () => {
    const values = [100, 90, 70, 50, 30, 10, 1].map((rh) => dewPoint(25, rh));
    for (let i = 1; i < values.length; i++) expect(values[i]).toBeLessThan(values[i - 1]);
  });

  it.each([
    ['humidity', 25, 0],
    ['humidity', 25, -5],
    ['humidity', 25, 100.0001],
    ['humidity', 25, Number.NaN],
    ['temperature', -100.1, 50],
    ['temperature', 200.1, 50],
    ['temperature', Number.POSITIVE_INFINITY, 50],
  ])('when %s is out of range (%p degC, %p %RH), then it is refused naming it', (field, t, rh) => {
    expect(() => dewPoint(t, rh)).toThrow(DewPointInputError);
    expect(() => dewPoint(t, rh)).toThrow(expect.objectContaining({ field }));
  });

  it.each([
    [-100, 50],
    [200, 50],
    [25, 100],
    [25, 0.001],
  ])('when the input sits on an allowed edge (%p degC, %p %RH), then a finite value comes back', (t, rh) => {
    expect(Number.isFinite(dewPoint(t, rh))).toBe(true);
  });

  it('when the dew point is below 0 degC, then the note says the value over ice differs by about a degree', () => {
    expect(dewPointNote(-10, dewPoint(-10, 80))).toMatch(/ice.*about a degree/);
    expect(dewPointNote(20, dewPoint(20, 50))).toBeNull();
    expect(dewPointNote(120, dewPoint(120, 50))).toMatch(/extrapolation/);
  });
});

describe('condensationRisks', () => {
  // The demo's climate sequence: cold soak, ramp (its end temperature), damp heat, a cold step, recovery.
  const steps = [
    { name: 'Cold soak -20 °C', temperatureC: -20, humidityPct: null },
    { name: 'Ramp to 40 °C', temperatureC: 40, humidityPct: null },
    { name: 'Damp heat 40 °C 85 %RH', temperatureC: 40, humidityPct: 85 },
    { name: 'Cold step -10 °C', temperatureC: -10, humidityPct: null },
    { name: 'Recovery 23 °C 50 %RH', temperatureC: 23, humidityPct: 50 },
  ];

  it('when a colder step follows a humid one, then that step is flagged with the earlier dew point, and the frost caution below 0 degC', () => {
    const risks = condensationRisks(steps);
    expect(risks.slice(0, 3)).toEqual([null, null, null]);
    expect(risks[3]).toContain('37 °C dew point of the earlier step "Damp heat 40 °C 85 %RH"');
    expect(risks[3]).toMatch(/about a degree/);
  });

  it('when a humid step takes a part that comes from a colder step, then the humid step is flagged (the part is below its dew point)', () => {
    const risks = condensationRisks(steps);
    // 23 degC at 50 %RH: dew point 12.02 degC (by hand: gamma = -0.693147 + 1.523737 = 0.830590; 243.04 x 0.830590 / 16.794410 = 12.020).
    expect(risks[4]).toContain('A part coming from -10 °C is below this step\'s 12 °C dew point');
    const direct = condensationRisks([steps[0], steps[2]]);
    expect(direct[1]).toContain('A part coming from -20 °C');
  });

  it('when no step is humid or nothing gets colder, then there is no caution', () => {
    expect(condensationRisks([steps[0], steps[1], steps[3]])).toEqual([null, null, null]);
    expect(
      condensationRisks([
        { name: 'Dry heat', temperatureC: 85, humidityPct: 10 },
        { name: 'Damp heat', temperatureC: 40, humidityPct: 93 },
        { name: 'Hotter', temperatureC: 60, humidityPct: null },
      ]),
    ).toEqual([null, null, null]);
  });

  it('when a step has no temperature, then it is skipped rather than flagged', () => {
    expect(condensationRisks([{ name: 'Humid', temperatureC: 40, humidityPct: 90 }, { name: 'Unknown', temperatureC: null, humidityPct: null }])).toEqual([null, null]);
  });
});
