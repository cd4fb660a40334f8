/**
 * Structure checks of a calibration read from a file. The recorded hash proves the content has
 * not changed since it was hashed, not that it was written by this tool or is complete: a file
 * re-hashed after an edit, or written by another program, must still never reach the arithmetic
 * with a missing model, a text where a number belongs, or a non-positive reference path length
 * (which would give a concentration of the wrong sign that looks like a result). Pure.
 */
import { BandwrightError } from '../errors.js';
import { predictCls, type ClsModel } from '../models/cls/spectral.js';

type Json = unknown;

function isObject(value: Json): value is Record<string, Json> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

class ShapeChecker {
  constructor(readonly source: string) {}

  fail(path: string, value: Json, rule: string): never {
    let shown = value === undefined ? 'missing' : (JSON.stringify(value) ?? typeof value);
    if (shown.length > 60) shown = `${shown.slice(0, 60)}…`;
    throw new BandwrightError(
      'SCHEMA',
      `${this.source}: ${path} = ${shown}, ${rule}; the calibration file is damaged or was not written by bandwright`,
      {
        file: this.source,
        parameter: path,
      },
    );
  }

  object(value: Json, path: string): Record<string, Json> {
    if (!isObject(value)) this.fail(path, value, 'must be an object');
    return value;
  }

  array(value: Json, path: string): Json[] {
    if (!Array.isArray(value)) this.fail(path, value, 'must be a list');
    return value;
  }

  text(value: Json, path: string): string {
    if (typeof value !== 'string') this.fail(path, value, 'must be text');
    return value;
  }

  choice(value: Json, path: string, choices: readonly string[]): string {
    if (typeof value !== 'string' || !choices.includes(value))
      this.fail(path, value, `must be one of ${choices.join(', ')}`);
    return value;
  }

  finite(
    value: Json,
    path: string,
    rule: (n: number) => boolean = () => true,
    ruleText = 'must be a finite number',
  ): number {
    if (typeof value !== 'number' || !Number.isFinite(value) || !rule(value))
      this.fail(path, value, ruleText);
    return value;
  }

  finiteOrNull(value: Json, path: string): void {
    if (value !== null) this.finite(value, path, () => true, 'must be a finite number or null');
  }

  numbers(value: Json, path: string, minLength = 0): number[] {
    const list = this.array(value, path);
    if (list.length < minLength) this.fail(path, `${list.length} values`, `must hold at least ${minLength}`);
    list.forEach((entry, i) => this.finite(entry, `${path}[${i}]`));
    return list as number[];
  }

  window(value: Json, path: string): [number, number] {
    const [low, high] = this.numbers(value, path, 2);
    if (this.array(value, path).length !== 2 || !((low as number) < (high as number)))
      this.fail(path, value, 'must be [low, high] in cm⁻¹ with low < high');
    return [low as number, high as number];
  }
}

const UNITS = ['ppm', 'ppb', 'pct'];

function checkUnivariateModel(check: ShapeChecker, value: Json, path: string): void {
  const model = check.object(value, path);
  check.choice(model.kind, `${path}.kind`, ['univariate']);
  check.choice(model.form, `${path}.form`, ['linear', 'origin', 'quadratic']);
  check.choice(model.weights, `${path}.weights`, ['none', '1/x', '1/x2', 'replicates']);
  const weighting = check.object(model.weighting, `${path}.weighting`);
  check.finite(weighting.scale, `${path}.weighting.scale`, (n) => n > 0, 'must be a number > 0');
  if (weighting.floor !== null)
    check.finite(weighting.floor, `${path}.weighting.floor`, (n) => n > 0, 'must be a number > 0 or null');
  if (weighting.levels !== null) {
    check.array(weighting.levels, `${path}.weighting.levels`).forEach((level, i) => {
      const where = `${path}.weighting.levels[${i}]`;
      const entry = check.object(level, where);
      check.finite(entry.concentration, `${where}.concentration`);
      check.finite(entry.sd, `${where}.sd`, (n) => n > 0, 'must be a number > 0');
    });
  }
  for (const group of ['coefficients', 'standardErrors'] as const) {
    const coefficients = check.object(model[group], `${path}.${group}`);
    for (const name of ['a', 'b', 'c']) check.finite(coefficients[name], `${path}.${group}.${name}`);
  }
  const covariance = check.array(model.covariance, `${path}.covariance`);
  if (covariance.length !== 3) check.fail(`${path}.covariance`, `${covariance.length} rows`, 'must be 3 × 3');
  covariance.forEach((row, i) => {
    if (check.numbers(row, `${path}.covariance[${i}]`).length !== 3)
      check.fail(`${path}.covariance[${i}]`, row, 'must hold 3 numbers');
  });
  check.finite(model.residualSD, `${path}.residualSD`, (n) => n >= 0, 'must be a number >= 0');
  check.finite(
    model.degreesOfFreedom,
    `${path}.degreesOfFreedom`,
    (n) => Number.isInteger(n) && n >= 1,
    'must be a whole number >= 1',
  );
  check.finite(
    model.standards,
    `${path}.standards`,
    (n) => Number.isInteger(n) && n >= 2,
    'must be a whole number >= 2',
  );
  check.finite(model.sumWeights, `${path}.sumWeights`, (n) => n > 0, 'must be a number > 0');
  check.finite(model.sxx, `${path}.sxx`, (n) => n >= 0, 'must be a number >= 0');
  check.finite(model.sumXSquared, `${path}.sumXSquared`, (n) => n >= 0, 'must be a number >= 0');
  check.finite(model.meanX, `${path}.meanX`);
  check.finite(model.meanResponse, `${path}.meanResponse`);
  const range = check.numbers(model.range, `${path}.range`, 2);
  if (range.length !== 2 || !((range[0] as number) <= (range[1] as number)))
    check.fail(`${path}.range`, model.range, 'must be [lowest, highest] concentration');
  const limits = check.object(model.limits, `${path}.limits`);
  for (const name of ['detection', 'determination']) {
    const limit = check.object(limits[name], `${path}.limits.${name}`);
    check.finiteOrNull(limit.value, `${path}.limits.${name}.value`);
    if (limit.value !== null) check.text(limit.definition, `${path}.limits.${name}.definition`);
  }
}

function checkGas(check: ShapeChecker, value: Json, path: string, needsBand: boolean): void {
  const gas = check.object(value, path);
  check.text(gas.gas, `${path}.gas`);
  check.choice(gas.unit, `${path}.unit`, UNITS);
  if (gas.feature !== undefined || needsBand) {
    const feature = check.object(gas.feature, `${path}.feature`);
    check.window(feature.band, `${path}.feature.band`);
    check
      .array(feature.baseline, `${path}.feature.baseline`)
      .forEach((window, i) => check.window(window, `${path}.feature.baseline[${i}]`));
    check.finite(
      feature.baselineOrder,
      `${path}.feature.baselineOrder`,
      (n) => Number.isInteger(n) && n >= 0 && n <= 3,
      'must be a whole number from 0 to 3',
    );
    check.choice(feature.response, `${path}.feature.response`, ['area', 'height']);
  }
  checkUnivariateModel(check, gas.model, `${path}.model`);
  if (gas.zeroGasLimit !== undefined)
    check.finite(
      check.object(gas.zeroGasLimit, `${path}.zeroGasLimit`).value,
      `${path}.zeroGasLimit.value`,
      (n) => n >= 0,
      'must be a number >= 0',
    );
}

/**
 * The parts of a CLS model its prediction operators are rebuilt from: one pure spectrum over the
 * grid per term, and channel segments that cover the grid in order.
 */
function checkClsLayout(check: ShapeChecker, model: Record<string, Json>, channels: number): void {
  const components = check.array(model.components, 'cls.model.components').length;
  const terms = check.array(model.terms, 'cls.model.terms');
  terms.forEach((raw, t) => {
    const term = check.object(raw, `cls.model.terms[${t}]`);
    check.finite(
      term.component,
      `cls.model.terms[${t}].component`,
      (n) => Number.isInteger(n) && n >= 0 && n < components,
      `must be the index of one of the ${components} components`,
    );
    check.finite(term.power, `cls.model.terms[${t}].power`, (n) => n === 1 || n === 2, 'must be 1 or 2');
  });
  const spectra = check.array(model.pureSpectra, 'cls.model.pureSpectra');
  if (spectra.length !== terms.length)
    check.fail('cls.model.pureSpectra', `${spectra.length} rows`, `must hold one per term (${terms.length})`);
  spectra.forEach((row, t) => {
    if (check.numbers(row, `cls.model.pureSpectra[${t}]`).length !== channels)
      check.fail(`cls.model.pureSpectra[${t}]`, '[…]', `must hold one value per channel (${channels})`);
  });
  let next = 0;
  check.array(model.segments, 'cls.model.segments').forEach((raw, i) => {
    const path = `cls.model.segments[${i}]`;
    const segment = check.object(raw, path);
    check.finite(
      segment.start,
      `${path}.start`,
      (n) => n === next,
      `must be ${next}, where the previous ends`,
    );
    next = check.finite(
      segment.end,
      `${path}.end`,
      (n) => Number.isInteger(n) && n > next && n <= channels,
      `must be a channel index above start and at most ${channels}`,
    );
    check.finite(
      segment.region,
      `${path}.region`,
      (n) => Number.isInteger(n) && n >= 0,
      'must be a whole number >= 0',
    );
  });
  if (next !== channels) check.fail('cls.model.segments', `${next} channels`, `must cover all ${channels}`);
}

function checkCls(check: ShapeChecker, value: Json): void {
  const cls = check.object(value, 'cls');
  const model = check.object(cls.model, 'cls.model');
  check.choice(model.kind, 'cls.model.kind', ['cls']);
  const grid = check.numbers(model.grid, 'cls.model.grid', 3);
  for (let i = 1; i < grid.length; i++)
    if (!((grid[i] as number) > (grid[i - 1] as number)))
      check.fail(`cls.model.grid[${i}]`, grid[i], 'must be above the previous channel (ascending cm⁻¹)');
  check.array(model.components, 'cls.model.components').forEach((raw, i) => {
    const component = check.object(raw, `cls.model.components[${i}]`);
    check.text(component.name, `cls.model.components[${i}].name`);
    check.choice(component.unit, `cls.model.components[${i}].unit`, UNITS);
    if (typeof component.reported !== 'boolean')
      check.fail(`cls.model.components[${i}].reported`, component.reported, 'must be true or false');
  });
  const regions = check
    .array(cls.regions, 'cls.regions')
    .map((window, i) => check.window(window, `cls.regions[${i}]`));
  grid.forEach((channel, i) => {
    if (!regions.some((region) => channel >= region[0] && channel <= region[1]))
      check.fail(`cls.model.grid[${i}]`, channel, 'must lie inside one of cls.regions');
  });
  checkClsLayout(check, model, grid.length);
  const limits = check.object(cls.detectionLimits, 'cls.detectionLimits');
  for (const [name, limit] of Object.entries(limits))
    check.finite(limit, `cls.detectionLimits.${name}`, (n) => n >= 0, 'must be a number >= 0');
  // The model's matrices are many and internal: a blank prediction exercises all of them, and a
  // damaged one shows as an exception or a non-finite estimate.
  let problem: string | undefined;
  try {
    const blank = predictCls(model as unknown as ClsModel, new Float64Array(grid.length), { phi: 1 });
    const bad = [...blank.estimates, ...blank.interferents].find(
      (e) => !Number.isFinite(e.value) || !(Number.isFinite(e.se) && e.se >= 0) || !(e.low <= e.high),
    );
    if (bad !== undefined)
      problem =
        `a blank gives ${bad.name} = ${bad.value} ± ${bad.se} (${bad.low} to ${bad.high}), not a ` +
        `finite estimate with a standard error >= 0`;
  } catch (error) {
    problem = error instanceof Error ? error.message : String(error);
  }
  if (problem !== undefined) check.fail('cls.model', '{…}', `cannot predict (${problem})`);
}

/**
 * Checks that a parsed calibration has every part quantification uses, of the right type and in
 * range: reference conditions > 0, the method kind, each gas's unit, band windows and univariate
 * model numbers, the CLS model (exercised on a blank), inputs with hex SHA-256 digests.
 *
 * @param record - the parsed JSON object (top-level fields already known to be present)
 * @param source - file name for messages
 * @throws BandwrightError `SCHEMA` naming the field, the value and the rule
 */
export function checkCalibrationShape(record: Record<string, unknown>, source: string): void {
  const check = new ShapeChecker(source);
  const tool = check.object(record.tool, 'tool');
  check.text(tool.name, 'tool.name');
  check.text(tool.version, 'tool.version');
  check.text(record.createdAt, 'createdAt');
  if (record.title !== undefined) check.text(record.title, 'title');
  const method = check.object(record.method, 'method');
  const kind = check.choice(method.model, 'method.model', ['band', 'responses', 'cls']);
  check.finite(
    method.saturationAbsorbance,
    'method.saturationAbsorbance',
    (n) => n > 0,
    'must be an absorbance > 0',
  );
  const reference = check.object(record.reference, 'reference');
  for (const field of ['pathLength_m', 'temperature_K', 'pressure_kPa'])
    check.finite(reference[field], `reference.${field}`, (n) => n > 0, 'must be a number > 0');
  const gases = check.array(record.gases, 'gases');
  if (kind === 'cls') checkCls(check, record.cls);
  else gases.forEach((gas, i) => checkGas(check, gas, `gases[${i}]`, kind === 'band'));
  check
    .array(record.standards, 'standards')
    .forEach((standard, i) => check.object(standard, `standards[${i}]`));
  check.array(record.inputs, 'inputs').forEach((raw, i) => {
    const input = check.object(raw, `inputs[${i}]`);
    check.text(input.role, `inputs[${i}].role`);
    if (check.text(input.path, `inputs[${i}].path`) === '')
      check.fail(`inputs[${i}].path`, input.path, 'must name a file');
    if (!/^[0-9a-f]{64}$/.test(check.text(input.sha256, `inputs[${i}].sha256`)))
      check.fail(`inputs[${i}].sha256`, input.sha256, 'must be 64 lower-case hexadecimal digits');
  });
  for (const field of ['warnings', 'cautions'])
    check.array(record[field], field).forEach((entry, i) => check.text(entry, `${field}[${i}]`));
}
