/**
 * Separation ratios of CLS components. Each component's spectrum, and the difference between each
 * pair, must stand out of the error the calibration leaves in them. That error is not spread evenly
 * over the channels when the residual is lack of fit (saturated lines, lines of different gases
 * overlapping in transmittance) or when noise grows where the standards absorb; since K̂ is fitted
 * channel by channel, its error at channel j is s² h_j (XᵀX)⁻¹, with h_j the residual energy of the
 * standards in a 17-channel window around j relative to its mean (h ≡ 1 for bands). The signal
 * ratio of a component with terms T is the Wald statistic Σ_j k_Tjᵀ [(XᵀX)⁻¹_TT]⁻¹ k_Tj / h_j over
 * s² τ_B |T|: about 1 for a spectrum that is residual alone. A component with a second-order term
 * is judged on both terms jointly: over standards that start at zero, u and u² are nearly
 * collinear, so neither pure spectrum alone is well determined even when the pair is. The
 * separation ratio of two components compares their response spectra v = k₁ + u_max k₂ (the
 * secant over the calibrated range, the slope at mid-range; v = k₁ for a linear component) in the
 * same weighted metric: energy of the part of v_a not parallel to v_b over the error expected in
 * v_a − λ v_b. With an even residual they reduce to unweighted energies against s² (XᵀX)⁻¹ τ_B.
 */
import { bilinearForm, identity, solveByQr } from '../../stats/linear-algebra.js';
import type { ChannelSegment } from './basis.js';
import type { FittedState } from './fit-state.js';
import type { ClsComponent, ClsLackOfFit, ClsTerm } from './model.js';
import { termsOf } from './terms.js';

/**
 * Half-width, in channels, of the moving window over which the calibration residual's energy is
 * averaged to weight the separation checks (17 channels × the standards' residual degrees of
 * freedom: enough for a stable local level, narrow enough to follow single lines' lack of fit).
 */
const RESIDUAL_PROFILE_HALF_WIDTH = 8;

/** Smallest local residual level, relative to the mean, used as a weight (keeps weights finite). */
const RESIDUAL_PROFILE_FLOOR = 1e-4;

/** What the separation checks need beyond the fitted state. */
export interface SeparationInput {
  fitted: FittedState;
  projected: readonly Float64Array[];
  nuisance: readonly Float64Array[];
  design: readonly Float64Array[];
  components: readonly ClsComponent[];
  terms: readonly ClsTerm[];
  segments: readonly ChannelSegment[];
  conditionLimit: number;
  channelWord: string;
  localWeights: boolean;
  lackOfFit: ClsLackOfFit;
}

/**
 * Relative residual level h_j per channel: the standards' residual energy averaged over a window
 * of ±{@link RESIDUAL_PROFILE_HALF_WIDTH} channels inside the channel's segment, divided by its
 * mean over the channels; all ones when `local` is false.
 */
function residualProfile(
  residuals: readonly Float64Array[],
  segments: readonly ChannelSegment[],
  channels: number,
  local: boolean,
): Float64Array {
  const profile = new Float64Array(channels).fill(1);
  if (!local) return profile;
  const energy = new Float64Array(channels);
  for (const row of residuals) for (let j = 0; j < channels; j++) energy[j]! += row[j]! * row[j]!;
  for (const segment of segments) {
    for (let j = segment.start; j < segment.end; j++) {
      const from = Math.max(segment.start, j - RESIDUAL_PROFILE_HALF_WIDTH);
      const to = Math.min(segment.end - 1, j + RESIDUAL_PROFILE_HALF_WIDTH);
      let sum = 0;
      for (let k = from; k <= to; k++) sum += energy[k]!;
      profile[j] = sum / (to - from + 1);
    }
  }
  let mean = 0;
  for (let j = 0; j < channels; j++) mean += profile[j]!;
  mean /= channels;
  if (!(mean > 0)) return profile.fill(1);
  for (let j = 0; j < channels; j++) profile[j] = Math.max(profile[j]! / mean, RESIDUAL_PROFILE_FLOOR);
  return profile;
}

/** Signal and separation ratios of every component; nothing is thrown. */
export interface SeparationRatios {
  components: {
    component: number;
    signal: number | null;
    secondOrderSignal: (number | null)[];
    separation: number | null;
  }[];
  /** Pairs (component, other) with their separation ratio, in the order they are checked. */
  pairs: { component: number; other: number; ratio: number }[];
}

/**
 * Signal and separation ratios of every component (see the module header).
 *
 * @param input - the fit, design, components and terms, segments and whether to weight locally
 * @returns per component its signal ratio(s) and smallest separation ratio, and every pair checked
 */
export function separationRatios(
  input: Pick<SeparationInput, 'fitted' | 'design' | 'components' | 'terms' | 'segments' | 'localWeights'>,
): SeparationRatios {
  const { fitted, components, terms } = input;
  const { state } = fitted;
  const q = terms.length;
  const p = components.length;
  const channels = state.pureSpectra[0]!.length;
  const n = fitted.residuals.length;
  const variance =
    state.calibrationResidualCount > 0 ? state.calibrationResidualSum / state.calibrationResidualCount : 0;
  if (!(variance > 0)) {
    return {
      components: components.map((_, c) => ({
        component: c,
        signal: null,
        secondOrderSignal: termsOf(terms, c)
          .slice(1)
          .map(() => null),
        separation: null,
      })),
      pairs: [],
    };
  }
  const baseCount = state.calibrationResidualCount / (n - q);
  const gram = state.concentrationGramInverse;
  // Weighted (1/h) inner products of the pure spectra, terms × terms.
  const profile = residualProfile(fitted.residuals, input.segments, channels, input.localWeights);
  const products = Array.from({ length: q }, () => new Array<number>(q).fill(0));
  for (let a = 0; a < q; a++) {
    const ka = state.pureSpectra[a]!;
    for (let b = a; b < q; b++) {
      const kb = state.pureSpectra[b]!;
      let sum = 0;
      for (let j = 0; j < channels; j++) sum += (ka[j]! * kb[j]!) / profile[j]!;
      products[a]![b] = products[b]![a] = sum;
    }
  }
  // Response spectra as combinations of the term rows: k₁ + u_max k₂.
  const combinations = components.map((_, c) => {
    const a = new Array<number>(q).fill(0);
    let top = 0;
    for (const row of input.design) top = Math.max(top, row[c]!);
    for (const t of termsOf(terms, c)) a[t] = terms[t]!.power === 1 ? 1 : top;
    return a;
  });
  const pairs: SeparationRatios['pairs'] = [];
  const entries = components.map((_, c) => {
    const block = termsOf(terms, c);
    // Wald energy Σ_j k_Tᵀ G_TT⁻¹ k_T / h_j per term.
    const inverse = solveByQr(
      block.map((a) => block.map((b) => gram[a]![b]!)),
      identity(block.length),
    );
    let energy = 0;
    block.forEach((a, i) => block.forEach((b, k) => (energy += inverse[i]![k]! * products[a]![b]!)));
    const signal = energy / block.length / (variance * baseCount);
    const secondOrderSignal = block
      .slice(1)
      .map((t) => products[t]![t]! / (variance * gram[t]![t]! * baseCount));
    let separation: number | null = null;
    const va = combinations[c]!;
    for (let other = 0; other < p; other++) {
      if (other === c) continue;
      // Part of v_a not parallel to v_b over the error expected in v_a − λ v_b.
      const vb = combinations[other]!;
      const lambda = bilinearForm(va, products, vb) / bilinearForm(vb, products, vb);
      const difference = bilinearForm(va, products, va) - lambda * bilinearForm(va, products, vb);
      const combined = va.map((value, i) => value - lambda * vb[i]!);
      const noise = variance * baseCount * bilinearForm(combined, gram, combined);
      if (!(noise > 0)) continue;
      const ratio = difference / noise;
      pairs.push({ component: c, other, ratio });
      if (separation === null || ratio < separation) separation = ratio;
    }
    return { component: c, signal, secondOrderSignal, separation };
  });
  return { components: entries, pairs };
}
