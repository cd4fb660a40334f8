/**
 * Separation checks of a CLS fit. The pure-spectrum matrix Kᵀ must have a column-scaled condition
 * number within the limit; then each component's spectrum, and the difference between each pair,
 * must stand out of the error the calibration leaves in them (`separation-ratios.ts`) by at least
 * {@link MINIMUM_SEPARATION_RATIO}. A failure is refused in words (`refusals.ts`).
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { BandwrightError } from '../../errors.js';
import { MINIMUM_SEPARATION_RATIO } from './model.js';
import { shapeRefusal, signalRefusal } from './refusals.js';
import { separationRatios, type SeparationInput } from './separation-ratios.js';
import { termName, termsOf } from './terms.js';
import { compactNumber, listNames } from '../../words.js';

/** What the checks found: the condition number of Kᵀ and the ratios per term. */
export interface PureSpectrumChecks {
  condition: number;
  signalRatio: (number | null)[];
  separationRatio: (number | null)[];
}

/**
 * Refuses pure spectra that cannot be separated: an ill-conditioned column-scaled Kᵀ, a
 * component whose spectrum does not stand out of the calibration residual, or two components
 * whose response spectra differ only by residual (see `separation-ratios.ts`). When the
 * residual is lack of fit, the message says so, and whether the second-order terms that would
 * remove it also make the component distinguishable.
 *
 * @param input - the fit and what it was fitted to
 * @returns the condition number of the column-scaled Kᵀ and the signal and separation ratios per term
 * @throws BandwrightError `SINGULAR` naming the components that cannot be separated
 */
export function checkPureSpectra(input: SeparationInput): PureSpectrumChecks {
  const { fitted, components, terms, conditionLimit, channelWord } = input;
  const { rFactor } = fitted;
  const q = terms.length;
  const names = terms.map((term) => termName(components, term));
  const columnNorms = Array.from({ length: q }, (_, t) =>
    Math.sqrt(rFactor.reduce((sum, row) => sum + row[t]! * row[t]!, 0)),
  );
  const zero = columnNorms.findIndex((norm) => !(norm > 0));
  if (zero >= 0) {
    throw new BandwrightError(
      'SINGULAR',
      `pure spectrum of ${names[zero]!} is zero on every ${channelWord}: it has no absorption in the method's ` +
        `${channelWord}s`,
      { parameter: 'spectra' },
    );
  }
  let condition = 1;
  if (q > 1) {
    const scaled = new Matrix(q, q);
    for (let i = 0; i < q; i++)
      for (let t = 0; t < q; t++) scaled.set(i, t, rFactor[i]![t]! / columnNorms[t]!);
    const svd = new SingularValueDecomposition(scaled, { computeLeftSingularVectors: false });
    const singular = svd.diagonal;
    const largest = Math.max(...singular);
    const smallest = Math.min(...singular);
    condition = smallest > 0 ? largest / smallest : Number.POSITIVE_INFINITY;
    if (!(condition <= conditionLimit)) {
      const v = svd.rightSingularVectors;
      const smallestIndex = singular.indexOf(smallest);
      const magnitudes = names.map((_, t) => Math.abs(v.get(t, smallestIndex)));
      const biggest = Math.max(...magnitudes);
      let involved = names.map((_, t) => t).filter((t) => magnitudes[t]! >= 0.25 * biggest);
      if (involved.length < 2)
        involved = names
          .map((_, t) => t)
          .sort((a, b) => magnitudes[b]! - magnitudes[a]!)
          .slice(0, 2)
          .sort((a, b) => a - b);
      throw new BandwrightError(
        'SINGULAR',
        `pure spectra of ${listNames(involved.map((t) => names[t]!))} nearly coincide over the method's ` +
          `${channelWord}s (condition number ${compactNumber(condition)} of the column-scaled pure-spectrum ` +
          `matrix, limit ${compactNumber(conditionLimit)}): their bands cannot be separated; extend the regions ` +
          `to where their bands differ, or drop one of them`,
        { parameter: 'spectra' },
      );
    }
  }

  const ratios = separationRatios(input);
  const weak = ratios.components.find(
    (entry) => entry.signal !== null && entry.signal < MINIMUM_SEPARATION_RATIO,
  );
  if (weak !== undefined) throw signalRefusal(input, weak.component, weak.signal!);
  const alike = ratios.pairs.find((pair) => pair.ratio < MINIMUM_SEPARATION_RATIO);
  if (alike !== undefined) throw shapeRefusal(input, alike.component, alike.other, alike.ratio);

  const signalRatio: (number | null)[] = new Array<number | null>(q).fill(null);
  const separationRatio: (number | null)[] = new Array<number | null>(q).fill(null);
  for (const entry of ratios.components) {
    const block = termsOf(terms, entry.component);
    signalRatio[block[0]!] = entry.signal;
    separationRatio[block[0]!] = entry.separation;
    block.slice(1).forEach((t, k) => (signalRatio[t] = entry.secondOrderSignal[k] ?? null));
  }
  return { condition, signalRatio, separationRatio };
}
