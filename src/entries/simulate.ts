/**
 * `bandwright/simulate`: line-by-line gas-cell spectra (Voigt lines, instrument line shape,
 * baseline and seeded noise) for demos and tests.
 */
export * from '../simulate/index.js';
