import { describe, expect, it } from 'vitest';
import { cautionsFor, exceededLimits, limitInPpm } from '../../src/gas/safety.js';
import { SPECIES, findSpecies, normalModeCount, requireInfraredSpecies } from '../../src/gas/species.js';

describe('species table', () => {
  it('counts normal modes 3n − 6, or 3n − 5 for linear molecules: H2O 3, CO2 4 (common practice)', () => {
    expect(normalModeCount(findSpecies('H2O')!)).toBe(3);
    expect(normalModeCount(findSpecies('CO2')!)).toBe(4);
    expect(normalModeCount(findSpecies('CO')!)).toBe(1);
  });

  it('marks the CO2 symmetric stretch IR-inactive (common practice)', () => {
    const nu1 = findSpecies('CO2')!.bands.find((b) => b.mode === 'ν1');
    expect(nu1?.irActive).toBe(false);
  });

  it('refuses homonuclear diatomics with the reason (common practice)', () => {
    for (const name of ['N2', 'O2', 'H2', 'Cl2']) {
      expect(() => requireInfraredSpecies(name, '--gas')).toThrow(
        /homonuclear diatomic.*no infrared absorption/,
      );
    }
  });

  it('refuses unknown gases, listing the known ones', () => {
    expect(() => requireInfraredSpecies('XYZ', '--gas')).toThrow(
      /"XYZ" is not in the species table; known gases: CO, CO2/,
    );
  });

  it('finds gases by alias, case-insensitively', () => {
    expect(findSpecies('carbon monoxide')?.name).toBe('CO');
    expect(findSpecies('so2')?.name).toBe('SO2');
  });

  it('has a molar mass for every species, summed from standard atomic weights (CO 28.010, H2O 18.015; common practice)', () => {
    expect(findSpecies('CO')!.molarMass_g_mol).toBeCloseTo(28.01, 3);
    expect(findSpecies('H2O')!.molarMass_g_mol).toBeCloseTo(18.015, 3);
    for (const species of SPECIES) expect(species.molarMass_g_mol).toBeGreaterThan(1);
  });
});

describe('cautions and limits', () => {
  it('gives one hazard line per toxic or asphyxiant gas, saying CO is odourless, then the general caution once', () => {
    const cautions = cautionsFor(['CO', 'H2O', 'co', 'CO2']);
    expect(cautions).toHaveLength(3);
    expect(cautions[0]).toMatch(/CO \(carbon monoxide\) is toxic\. CO is colourless and odourless\./);
    expect(cautions[1]).toMatch(/CO2 \(carbon dioxide\) is asphyxiant/);
    expect(cautions[2]).toMatch(/not a life-safety monitor/);
    expect(cautionsFor(['H2O'])).toEqual([]);
  });

  const niosh = {
    gas: 'CO',
    limit: 35,
    unit: 'ppm' as const,
    basis: 'TWA',
    source: 'NIOSH Pocket Guide (REL)',
  };

  it('judges over-limit on the upper end of the interval (NIOSH REL for CO 35 ppm TWA, facts.md)', () => {
    expect(exceededLimits('CO', 36, [niosh])).toHaveLength(1);
    expect(exceededLimits('CO', 34.9, [niosh])).toHaveLength(0);
  });

  it('converts mg/m³ limits at 25 °C: 40 mg/m³ of CO is about 34.9 ppm (NIOSH 1 ppm = 1.15 mg/m³)', () => {
    expect(limitInPpm({ ...niosh, limit: 40, unit: 'mg/m3' })).toBeCloseTo(40 / 1.1449, 2);
  });
});
