import { describe, expect, it } from 'vitest';
import { isBandwrightError } from '../../src/errors.js';
import {
  CARBON_DIOXIDE_NU3,
  CARBON_MONOXIDE_12C16O,
  HYDROGEN_CHLORIDE_H35CL,
  HYDROGEN_CHLORIDE_H37CL,
  NITROUS_OXIDE_NU3,
} from '../../src/simulate/constants.js';
import { GAS_MODELS } from '../../src/simulate/gas-models.js';
import { bandOrigin, diatomicPartitionSum, rotationalConstant } from '../../src/simulate/levels.js';
import { lineList, type LineList, type SpectralLine } from '../../src/simulate/lines.js';

const C2 = 1.438776877; // second radiation constant, cm·K (CODATA 2018, facts.md)

function line(list: LineList, label: string): SpectralLine {
  const found = list.lines.find((l) => l.label === label);
  if (found === undefined) throw new Error(`${list.gas}: no line ${label}`);
  return found;
}

function expectThrows(run: () => unknown, code: string, message: RegExp): void {
  try {
    run();
  } catch (error) {
    expect(isBandwrightError(error, code as never), String(error)).toBe(true);
    expect((error as Error).message).toMatch(message);
    return;
  }
  throw new Error('expected an error');
}

describe('CO line positions from the Huber–Herzberg constants', () => {
  const co = lineList('CO', 296);

  it('band origin G(1) − G(0) = 2143.27 cm⁻¹ (facts.md, computed from Huber & Herzberg)', () => {
    expect(bandOrigin(CARBON_MONOXIDE_12C16O)).toBeCloseTo(2143.27, 2);
  });

  it('R(0) = 2147.081 and P(1) = 2139.426 cm⁻¹ (facts.md, computed from Huber & Herzberg)', () => {
    expect(line(co, 'R(0)').position_cm).toBeCloseTo(2147.081, 3);
    expect(line(co, 'P(1)').position_cm).toBeCloseTo(2139.426, 3);
  });

  it('lines near the origin are ≈ 2B apart, within 3 % (rigid rotor, common practice)', () => {
    const B = rotationalConstant(CARBON_MONOXIDE_12C16O, 0);
    const r1 = line(co, 'R(1)').position_cm - line(co, 'R(0)').position_cm;
    const p = line(co, 'P(1)').position_cm - line(co, 'P(2)').position_cm;
    // B′ < B″ makes R spacings shrink and P spacings grow by about 2(B″ − B′) ≈ 0.035 cm⁻¹ per step.
    expect(Math.abs(r1 / (2 * B) - 1), `R(1) − R(0) = ${r1}, 2B₀ = ${2 * B}`).toBeLessThan(0.03);
    expect(Math.abs(p / (2 * B) - 1), `P(1) − P(2) = ${p}, 2B₀ = ${2 * B}`).toBeLessThan(0.03);
    expect(r1).toBeLessThan(p);
  });

  it('has the gap of a Σ–Σ band at the origin: no Q branch, P(1) to R(0) ≈ 4B (common practice)', () => {
    const origin = bandOrigin(CARBON_MONOXIDE_12C16O);
    const B = CARBON_MONOXIDE_12C16O.Be;
    expect(co.lines.filter((l) => l.branch === 'Q')).toEqual([]);
    const inside = co.lines.filter((l) => Math.abs(l.position_cm - origin) < 1.5 * B);
    expect(inside.map((l) => l.label)).toEqual([]);
    const gap = line(co, 'R(0)').position_cm - line(co, 'P(1)').position_cm;
    expect(gap / (2 * B)).toBeGreaterThan(1.9);
    expect(gap / (2 * B)).toBeLessThan(2.1);
  });

  it('single-line intensities R(8), R(9), R(10) agree with PTB measurements within 3 % (PTB line-strength measurements, abstract; facts.md)', () => {
    // Without Herman–Wallis factors (not sourced, so not applied) R lines come out 1–2 % low.
    const measured = { 'R(8)': 4.452e-19, 'R(9)': 4.217e-19, 'R(10)': 3.851e-19 } as const;
    for (const [label, value] of Object.entries(measured)) {
      const computed = line(co, label).intensity_cm_per_molecule;
      expect(
        Math.abs(computed - value) / value,
        `${label}: measured ${value}, computed ${computed}, tolerance 3 %`,
      ).toBeLessThan(0.03);
    }
  });
});

describe('other diatomic and linear molecules', () => {
  it('H³⁵Cl band origin ≈ 2885.98 cm⁻¹ (facts.md, Huber & Herzberg, from memory)', () => {
    expect(Math.abs(bandOrigin(HYDROGEN_CHLORIDE_H35CL) - 2885.98)).toBeLessThan(0.01);
  });

  it('H³⁷Cl lies ≈ 2.1 cm⁻¹ below H³⁵Cl (isotope relations, common practice; the familiar HCl doublets)', () => {
    const shift = bandOrigin(HYDROGEN_CHLORIDE_H35CL) - bandOrigin(HYDROGEN_CHLORIDE_H37CL);
    expect(shift).toBeGreaterThan(1.9);
    expect(shift).toBeLessThan(2.3);
    const hcl = lineList('HCl', 296);
    const r3 = hcl.lines.filter((l) => l.label.endsWith(' R(3)'));
    expect(r3.length).toBe(2);
    // Abundance ratio ³⁵Cl/³⁷Cl ≈ 3.1 (IUPAC abundances, from memory) shows in the doublet.
    const [light, heavy] = [
      r3.find((l) => l.label.startsWith('H³⁵Cl')),
      r3.find((l) => l.label.startsWith('H³⁷Cl')),
    ];
    expect((light?.intensity_cm_per_molecule ?? 0) / (heavy?.intensity_cm_per_molecule ?? 1)).toBeGreaterThan(
      2.9,
    );
  });

  it('HCl and CO₂ ν3 have no Q branch; NO (²Π) has one near its origin (Σ–Σ vs Π selection rules, common practice)', () => {
    expect(lineList('HCl', 296).lines.some((l) => l.branch === 'Q')).toBe(false);
    expect(lineList('CO2', 296).lines.some((l) => l.branch === 'Q')).toBe(false);
    const no = lineList('NO', 296);
    const q = no.lines.filter((l) => l.branch === 'Q');
    expect(q.length).toBeGreaterThan(10);
    const origin = 1876; // facts.md: ν0 ≈ 1876 (Huber & Herzberg, from memory)
    const strongestQ = q.reduce((a, b) =>
      b.intensity_cm_per_molecule > a.intensity_cm_per_molecule ? b : a,
    );
    expect(Math.abs(strongestQ.position_cm - origin)).toBeLessThan(3);
    expect(no.notes.join(' ')).toMatch(/simplified/);
  });

  it('¹²C¹⁶O₂ ν3 has lines only from even J″ (nuclear-spin statistics; common practice, from memory)', () => {
    const co2 = lineList('CO2', 296);
    expect(co2.lines.length).toBeGreaterThan(50);
    expect(co2.lines.filter((l) => l.lowerJ % 2 !== 0).map((l) => l.label)).toEqual([]);
    // So neighbouring R lines are ≈ 4B apart, and the first P line is P(2).
    const r0 = line(co2, 'R(0)').position_cm;
    const r2 = line(co2, 'R(2)').position_cm;
    expect((r2 - r0) / (4 * CARBON_DIOXIDE_NU3.lowerB)).toBeCloseTo(1, 1);
    expect(co2.lines.some((l) => l.label === 'P(1)')).toBe(false);
    expect(co2.lines.some((l) => l.label === 'P(2)')).toBe(true);
    // Strongest line near 2361 cm⁻¹ (R(16) region; from memory).
    const strongest = co2.lines.reduce((a, b) =>
      b.intensity_cm_per_molecule > a.intensity_cm_per_molecule ? b : a,
    );
    expect(Math.abs(strongest.position_cm - 2361)).toBeLessThan(3);
  });

  it('N₂O ν3 keeps odd and even J″ (NNO has no exchange symmetry; common practice)', () => {
    const n2o = lineList('N2O', 296);
    expect(n2o.lines.some((l) => l.label === 'R(1)')).toBe(true);
    expect(line(n2o, 'R(0)').position_cm - NITROUS_OXIDE_NU3.bandOrigin_cm).toBeCloseTo(
      2 * NITROUS_OXIDE_NU3.upperB,
      4,
    );
  });
});

describe('intensities, partition sums and temperature', () => {
  it('at 296 K the line intensities add up to the band strength (normalisation, facts.md: CO 1.013e-17, Zou & Varanasi 2002)', () => {
    const co = lineList('CO', 296);
    expect(co.totalIntensity_cm_per_molecule / 1.013e-17).toBeCloseTo(1, 9);
    for (const gas of Object.keys(GAS_MODELS)) {
      const list = lineList(gas, 296);
      expect(list.totalIntensity_cm_per_molecule / list.bandStrength296_cm_per_molecule, gas).toBeCloseTo(
        1,
        6,
      );
    }
  });

  it('CO rotational partition sum at 296 K ≈ T/(c₂B₀) + 1/3 (high-temperature expansion, common practice) and is a direct sum', () => {
    const B0 = rotationalConstant(CARBON_MONOXIDE_12C16O, 0);
    const sums = diatomicPartitionSum(CARBON_MONOXIDE_12C16O, 296);
    const expansion = 296 / (C2 * B0) + 1 / 3;
    expect(Math.abs(sums.rotational - expansion) / expansion).toBeLessThan(1e-3);
    // At 10 K only a few levels are populated; the sum must equal their explicit enumeration
    // (definition of Q with F₀(J) = B₀J(J+1) − D₀J²(J+1)²; v ≥ 1 is empty at 10 K).
    const cold = diatomicPartitionSum(CARBON_MONOXIDE_12C16O, 10).rotational;
    let explicit = 0;
    const D0 = CARBON_MONOXIDE_12C16O.De;
    for (let J = 0; J <= 15; J++)
      explicit += (2 * J + 1) * Math.exp((-C2 * (B0 * J * (J + 1) - D0 * (J * (J + 1)) ** 2)) / 10);
    expect(Math.abs(cold - explicit) / explicit, `direct ${cold}, explicit ${explicit}`).toBeLessThan(1e-9);
  });

  it('scales single lines by the line-by-line formula of facts.md (standard practice, from memory)', () => {
    const cold = lineList('CO', 296);
    const hot = lineList('CO', 600);
    const q296 = diatomicPartitionSum(CARBON_MONOXIDE_12C16O, 296).total;
    const q600 = diatomicPartitionSum(CARBON_MONOXIDE_12C16O, 600).total;
    for (const label of ['R(0)', 'P(12)', 'R(30)']) {
      const a = line(cold, label);
      const expected =
        a.intensity_cm_per_molecule *
        (q296 / q600) *
        (Math.exp((-C2 * a.lowerStateEnergy_cm) / 600) / Math.exp((-C2 * a.lowerStateEnergy_cm) / 296)) *
        ((1 - Math.exp((-C2 * a.position_cm) / 600)) / (1 - Math.exp((-C2 * a.position_cm) / 296)));
      expect(line(hot, label).intensity_cm_per_molecule / expected, label).toBeCloseTo(1, 10);
    }
  });

  it('a hotter gas moves intensity to higher J: R-branch maximum near √(kT/2hcB) − ½ (common practice)', () => {
    const B0 = rotationalConstant(CARBON_MONOXIDE_12C16O, 0);
    const peaks: number[] = [];
    for (const temperature of [296, 700]) {
      const r = lineList('CO', temperature).lines.filter((l) => l.branch === 'R');
      const strongest = r.reduce((a, b) =>
        b.intensity_cm_per_molecule > a.intensity_cm_per_molecule ? b : a,
      );
      const predicted = Math.sqrt(temperature / (2 * C2 * B0)) - 0.5;
      expect(
        Math.abs(strongest.lowerJ - predicted),
        `${temperature} K: strongest R(${strongest.lowerJ}), predicted J ≈ ${predicted.toFixed(2)}`,
      ).toBeLessThanOrEqual(1);
      peaks.push(strongest.lowerJ);
    }
    expect(peaks[1]).toBeGreaterThan(peaks[0] as number);
    const highJShare = (list: LineList): number =>
      list.lines.filter((l) => l.lowerJ >= 15).reduce((s, l) => s + l.intensity_cm_per_molecule, 0) /
      list.totalIntensity_cm_per_molecule;
    expect(highJShare(lineList('CO', 700))).toBeGreaterThan(2 * highJShare(lineList('CO', 296)));
  });

  it('approximate band models are marked and their H₂O lines cover 1300–2000 and 3500–4000 cm⁻¹ (facts.md band centres)', () => {
    for (const gas of ['H2O', 'CH4', 'NH3', 'SO2']) {
      const list = lineList(gas, 296);
      expect(list.approximate, gas).toBe(true);
      expect(list.notes.join(' '), gas).toMatch(/approximate/);
    }
    for (const gas of ['CO', 'HCl', 'NO', 'CO2', 'N2O'])
      expect(lineList(gas, 296).approximate, gas).toBe(false);
    const water = lineList('H2O', 296).lines;
    for (let lo = 1300; lo < 2000; lo += 100)
      expect(
        water.filter((l) => l.position_cm >= lo && l.position_cm < lo + 100).length,
        `H2O lines in ${lo}–${lo + 100}`,
      ).toBeGreaterThan(20);
    for (let lo = 3500; lo < 4000; lo += 100)
      expect(
        water.filter((l) => l.position_cm >= lo && l.position_cm < lo + 100).length,
        `H2O lines in ${lo}–${lo + 100}`,
      ).toBeGreaterThan(20);
  });

  it('the invented pattern of a band model is the same on every call (truth independent of any seed)', () => {
    expect(lineList('H2O', 296).lines).toEqual(lineList('H2O', 296).lines);
  });
});

describe('lineList errors', () => {
  it('refuses unknown, IR-inactive and unmodelled gases and bad temperatures, naming value and rule', () => {
    expectThrows(() => lineList('Xe', 296), 'UNKNOWN_GAS', /gas "Xe" is not in the species table/);
    expectThrows(() => lineList('N2', 296), 'IR_INACTIVE', /homonuclear/);
    expectThrows(() => lineList('NO2', 296), 'INVALID_VALUE', /no spectral model for NO2/);
    expectThrows(
      () => lineList('CO', 10),
      'INVALID_VALUE',
      /temperature_K = 10, must be between 50 and 3000 K/,
    );
  });
});
