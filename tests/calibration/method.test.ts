import { describe, expect, it } from 'vitest';
import { parseMethod, parseResponseMethod } from '../../src/calibration/method.js';

const band = {
  name: 'CO',
  unit: 'ppm',
  band: [2040, 2245],
  baseline: [
    [2000, 2030],
    [2255, 2290],
  ],
  model: 'quadratic',
};

describe('parseMethod', () => {
  it('reads the band method of DESIGN §4 and fills defaults', () => {
    const method = parseMethod(
      { gases: [band], model: 'band', recheck: { everyDays: 7, tolerancePct: 5 } },
      'method.json',
    );
    expect(method).toMatchObject({
      model: 'band',
      gases: [
        {
          name: 'CO',
          unit: 'ppm',
          band: [2040, 2245],
          curve: 'quadratic',
          weights: 'none',
          baselineOrder: 1,
          response: 'area',
        },
      ],
      recheck: { everyDays: 7, tolerancePct: 5 },
      saturationAbsorbance: 1,
      detectionAlpha: 0.05,
    });
  });

  it('reads a cls method with regions and interferents', () => {
    const method = parseMethod(
      {
        model: 'cls',
        gases: ['CO', { name: 'N2O', secondOrder: true }],
        interferents: ['H2O', 'CO2'],
        regions: [
          [2150, 2230],
          [2040, 2140],
        ],
        baselineOrder: 2,
      },
      'm.json',
    );
    expect(method.model).toBe('cls');
    if (method.model !== 'cls') return;
    expect(method.regions).toEqual([
      [2040, 2140],
      [2150, 2230],
    ]);
    expect(method.interferents.map((g) => g.name)).toEqual(['H2O', 'CO2']);
    expect(method.gases[1]).toEqual({ name: 'N2O', unit: 'ppm', secondOrder: true });
  });

  it.each([
    [{ gases: [{ ...band, band: [2245, 2040] }] }, /gases\[0\]\.band = 2245–2040 cm⁻¹, is inverted/],
    [{ gases: [{ ...band, baseline: [[2030, 2050]] }] }, /overlaps the band/],
    [{ gases: [{ ...band, name: 'N2' }] }, /N2 \(nitrogen\) cannot be measured by infrared absorption/],
    [{ gases: [{ ...band, name: 'XX' }] }, /gas "XX" is not in the species table/],
    [{ gases: [band, band] }, /appears twice/],
    [{ gases: [] }, /gases = \[\], must be a non-empty list/],
    [
      { gases: [{ ...band, model: 'cubic' }] },
      /gases\[0\].model = "cubic", must be one of linear, origin, quadratic/,
    ],
    [{ gases: [band], recheck: { everyDays: -1 } }, /recheck.everyDays = -1, must be a number of days > 0/],
    [{ gases: [band], colour: 'red' }, /colour = "red", is not a known field/],
    [
      {
        model: 'cls',
        gases: ['CO'],
        regions: [
          [2000, 2100],
          [2050, 2150],
        ],
      },
      /overlap/,
    ],
    [{ model: 'cls', gases: ['CO'] }, /regions = missing, must list at least one spectral region/],
  ])('refuses %j with a message naming the field', (value, message) => {
    expect(() => parseMethod(value, 'method.json')).toThrow(message);
  });
});

describe('parseResponseMethod', () => {
  it('validates one gas for response tables', () => {
    expect(parseResponseMethod({ name: 'co', model: 'origin' }, 'options').gases[0]).toEqual({
      name: 'CO',
      unit: 'ppm',
      curve: 'origin',
      weights: 'none',
    });
    expect(() => parseResponseMethod({ name: 'CO', weights: '1/y' }, 'options')).toThrow(/weights = "1\/y"/);
  });
});
