/**
 * Input checks shared by spectral and band-area CLS fits: shapes, finiteness, signs, component
 * names and options. Messages name the standard (index and label), the channel or component, the
 * value and the rule.
 */
import { BandwrightError } from '../../errors.js';
import type { ClsCoreData } from './fit-core.js';
import { DEFAULT_CLS_CONDITION_LIMIT, type ClsCommonFitOptions } from './model.js';

/** Options checked here. */
export interface ClsValidatedOptions {
  /** Confidence level, strictly between 0 and 1. */
  readonly level: number;
  /** Condition-number limit, ≥ 1. */
  readonly conditionLimit: number;
  /** Indices of components with a second-order term. */
  readonly secondOrder: number[];
}

/**
 * Validates standards and options for a CLS fit.
 *
 * @param data - responses (standards × channels), concentrations (standards × components), φ,
 *   components, optional standard labels
 * @param options - second-order component names, level, condition limit
 * @param context - expected channel count, the word for a channel (`channel`, `band`) and the
 *   parameter name of the responses (`spectra`, `areas`)
 * @returns the checked options with defaults applied
 * @throws BandwrightError `INVALID_VALUE` for any violated rule; `INSUFFICIENT_DATA` for no standards
 */
export function validateClsInputs(
  data: ClsCoreData,
  options: ClsCommonFitOptions,
  context: { channelCount: number; channelWord: string; responsesName: string },
): ClsValidatedOptions {
  const { responses, concentrations, phi, components } = data;
  const { channelCount, channelWord, responsesName } = context;
  const n = responses.length;
  const standard = (i: number): string => {
    const label = data.standardLabels?.[i];
    return `standard ${i + 1}${label !== undefined ? ` (${label})` : ''}`;
  };
  if (!(Number.isInteger(channelCount) && channelCount >= 1)) {
    throw new BandwrightError('INVALID_VALUE', `channels = ${channelCount}, must be a whole number >= 1`, {
      parameter: 'channels',
    });
  }
  if (components.length === 0)
    throw new BandwrightError('INVALID_VALUE', 'components is empty, must list at least one gas', {
      parameter: 'components',
    });
  const names = new Set<string>();
  components.forEach((component, j) => {
    if (typeof component.name !== 'string' || component.name.trim() === '') {
      throw new BandwrightError(
        'INVALID_VALUE',
        `components[${j}].name = ${JSON.stringify(component.name)}, must be a non-empty gas name`,
        { parameter: 'components' },
      );
    }
    if (names.has(component.name)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `components[${j}].name = "${component.name}" appears twice, names must be unique`,
        { parameter: 'components' },
      );
    }
    names.add(component.name);
    if (typeof component.reported !== 'boolean') {
      throw new BandwrightError(
        'INVALID_VALUE',
        `components[${j}] (${component.name}).reported = ${String(component.reported)}, must be true or false`,
        { parameter: 'components' },
      );
    }
    if (typeof component.unit !== 'string' || component.unit === '') {
      throw new BandwrightError(
        'INVALID_VALUE',
        `components[${j}] (${component.name}).unit = ${JSON.stringify(component.unit)}, must be a unit such as "ppm"`,
        { parameter: 'components' },
      );
    }
  });
  if (!components.some((component) => component.reported)) {
    throw new BandwrightError(
      'INVALID_VALUE',
      'no component is reported (all are interferents), at least one gas must be reported',
      { parameter: 'components' },
    );
  }
  if (n === 0)
    throw new BandwrightError('INSUFFICIENT_DATA', `${responsesName} is empty, a fit needs standards`, {
      parameter: responsesName,
    });
  if (concentrations.length !== n) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `concentrations has ${concentrations.length} rows for ${n} standards in ${responsesName}, must be equal`,
      { parameter: 'concentrations' },
    );
  }
  if (phi.length !== n) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `phi has ${phi.length} values for ${n} standards, must be equal`,
      { parameter: 'phi' },
    );
  }
  if (data.standardLabels !== undefined && data.standardLabels.length !== n) {
    throw new BandwrightError(
      'INVALID_VALUE',
      `standardLabels has ${data.standardLabels.length} labels for ${n} standards, must be equal`,
      { parameter: 'standardLabels' },
    );
  }
  for (let i = 0; i < n; i++) {
    const row = responses[i]!;
    if (row.length !== channelCount) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `${responsesName}[${i}] (${standard(i)}) has ${row.length} ${channelWord}s, must have ${channelCount}`,
        { parameter: responsesName },
      );
    }
    for (let j = 0; j < channelCount; j++) {
      if (!Number.isFinite(row[j])) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `${responsesName}[${i}] (${standard(i)}) ${channelWord} ${j} = ${row[j]}, must be a finite number`,
          { parameter: responsesName },
        );
      }
    }
    const c = concentrations[i]!;
    if (c.length !== components.length) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `concentrations[${i}] (${standard(i)}) has ${c.length} values for ${components.length} components, ` +
          `must be equal`,
        { parameter: 'concentrations' },
      );
    }
    components.forEach((component, j) => {
      const value = c[j];
      if (!(Number.isFinite(value) && (value as number) >= 0)) {
        throw new BandwrightError(
          'INVALID_VALUE',
          `concentrations[${i}][${j}] (${standard(i)}, ${component.name}) = ${value}, must be a finite number ` +
            `>= 0 ${component.unit}`,
          { parameter: 'concentrations' },
        );
      }
    });
    const f = phi[i];
    if (!(Number.isFinite(f) && (f as number) > 0)) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `phi[${i}] (${standard(i)}) = ${f}, must be a finite number > 0`,
        { parameter: 'phi' },
      );
    }
  }
  const level = options.level ?? 0.95;
  if (!(level > 0 && level < 1))
    throw new BandwrightError('INVALID_VALUE', `level = ${level}, must be strictly between 0 and 1`, {
      parameter: 'level',
    });
  const conditionLimit = options.conditionLimit ?? DEFAULT_CLS_CONDITION_LIMIT;
  if (!(conditionLimit >= 1))
    throw new BandwrightError('INVALID_VALUE', `conditionLimit = ${conditionLimit}, must be >= 1`, {
      parameter: 'conditionLimit',
    });
  const secondOrder: number[] = [];
  for (const name of options.secondOrder ?? []) {
    const index = components.findIndex((component) => component.name === name);
    if (index < 0) {
      throw new BandwrightError(
        'INVALID_VALUE',
        `secondOrder names "${name}", which is not among the components (${components.map((c) => c.name).join(', ')})`,
        { parameter: 'secondOrder' },
      );
    }
    if (secondOrder.includes(index))
      throw new BandwrightError('INVALID_VALUE', `secondOrder names "${name}" twice`, {
        parameter: 'secondOrder',
      });
    secondOrder.push(index);
  }
  return { level, conditionLimit, secondOrder };
}
