/** How numbers and lists are quoted in messages (src/words.ts). Expected texts: common practice. */
import { describe, expect, it } from 'vitest';
import { compactNumber, exponentText, listNames, significantDigits } from '../src/words.js';

describe('numbers in messages', () => {
  it('significant digits drop trailing zeros and keep the sign', () => {
    expect(significantDigits(0.031234, 3)).toBe('0.0312');
    expect(significantDigits(-0.031234, 3)).toBe('-0.0312');
    expect(significantDigits(2.5)).toBe('2.5');
    expect(significantDigits(123456)).toBe('123500');
    expect(significantDigits(Number.NaN)).toBe('NaN');
    expect(significantDigits(Number.POSITIVE_INFINITY)).toBe('Infinity');
  });

  it('compact numbers switch to exponent form outside 0.01 to 100 000', () => {
    expect(compactNumber(4.567)).toBe('4.57');
    expect(compactNumber(0.0123)).toBe('0.0123');
    expect(compactNumber(0.00346)).toBe('3.5e-3');
    expect(compactNumber(123456)).toBe('1.2e5');
    expect(compactNumber(0)).toBe('0');
    expect(compactNumber(Number.POSITIVE_INFINITY)).toBe('infinite');
    expect(exponentText(2.5e12)).toBe('2.5e12');
    expect(exponentText(Number.NaN)).toBe('infinite');
  });
});

describe('lists in messages', () => {
  it('joins names as a sentence does', () => {
    expect(listNames([])).toBe('');
    expect(listNames(['CO'])).toBe('CO');
    expect(listNames(['CO', 'N2O'])).toBe('CO and N2O');
    expect(listNames(['CO', 'N2O', 'H2O'])).toBe('CO, N2O and H2O');
  });
});
