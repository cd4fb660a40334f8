/**
 * Terms of the CLS design: every component linearly, then the second-order terms, θ(c) their
 * values at concentrations c.
 */
import type { ClsComponent, ClsTerm } from './model.js';

/**
 * The design terms: the components (power 1) in order, then a second-order term for each listed.
 *
 * @param componentCount - number of components
 * @param secondOrder - indices of the components given a second-order term
 */
export function designTerms(componentCount: number, secondOrder: readonly number[]): ClsTerm[] {
  return [
    ...Array.from({ length: componentCount }, (_, j) => ({ component: j, power: 1 as const })),
    ...secondOrder.map((j) => ({ component: j, power: 2 as const })),
  ];
}

/**
 * θ(c): the term values of concentrations c.
 *
 * @param terms - the design terms
 * @param c - concentrations (φ-scaled), one per component
 */
export function termValues(terms: readonly ClsTerm[], c: ArrayLike<number>): Float64Array {
  const theta = new Float64Array(terms.length);
  terms.forEach((term, t) => {
    const value = c[term.component]!;
    theta[t] = term.power === 1 ? value : value * value;
  });
  return theta;
}

/**
 * Indices of a component's terms: its linear term first, then its second-order term if any.
 *
 * @param terms - the design terms
 * @param component - index of the component
 */
export function termsOf(terms: readonly ClsTerm[], component: number): number[] {
  return terms.map((term, t) => (term.component === component ? t : -1)).filter((t) => t >= 0);
}

/**
 * Name of a term for messages: `CO`, or `CO (second-order term)`.
 *
 * @param components - the model's components
 * @param term - the term
 */
export function termName(components: readonly ClsComponent[], term: ClsTerm): string {
  const name = components[term.component]!.name;
  return term.power === 1 ? name : `${name} (second-order term)`;
}
