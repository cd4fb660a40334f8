/**
 * Method definitions: what to calibrate and how (DESIGN §4 "Method (JSON)"), validated from
 * parsed JSON into typed objects. Pure: the file is read in `src/store/calibration-file.ts`.
 */
import {
  assertBandWindows,
  assertWindow,
  formatWindow,
  windowsOverlap,
  type Window,
} from '../bands/windows.js';
import { BandwrightError } from '../errors.js';
import type { PartialConditions } from '../gas/conditions.js';
import { requireInfraredSpecies } from '../gas/species.js';
import { parseConcentrationUnit, type ConcentrationUnit } from '../gas/units.js';
import {
  CURVE_FORMS,
  WEIGHT_SCHEMES,
  type CurveForm,
  type WeightScheme,
} from '../models/univariate/model.js';

/** Which band feature is the response. */
export type ResponseKind = 'area' | 'height';

/** What a signal of the cumulative-sum chart does to a check's verdict. */
export type CusumSignal = 'warning' | 'fail';

/** The verdicts a CUSUM signal may give. */
export const CUSUM_SIGNALS: readonly CusumSignal[] = ['warning', 'fail'];

/**
 * Settings of the tabular CUSUM chart of check recoveries (ISO 7870-4), each optional: absent
 * fields take the defaults of `src/drift/cusum.ts` (k = 0.5σ, h = 5σ, a signal is a warning).
 */
export interface CusumPolicy {
  /** Reference value k, in units of σ (≥ 0): the shift per check the chart lets pass. */
  k?: number;
  /** Decision interval h, in units of σ (> 0): a cumulative sum above it is a signal. */
  h?: number;
  /** Verdict of a check at which the chart signals. */
  onSignal?: CusumSignal;
}

/**
 * The recheck schedule and acceptance of a calibration. The control-chart fields are optional and
 * kept only when the method states them, so that a calibration records what its author chose and
 * the defaults (in `src/drift/`) apply otherwise.
 */
export interface RecheckPolicy {
  /** Days between rechecks. */
  everyDays: number;
  /** Largest acceptable deviation of a check standard's recovery from 100 %, %. */
  tolerancePct: number;
  /** Smallest σ of the control rules, % recovery, > 0 and below the tolerance (default: tolerance/10). */
  sigmaFloorPct?: number;
  /** The cumulative-sum chart's settings. */
  cusum?: CusumPolicy;
}

/** Default recheck policy: weekly, ±5 % (check-standard agreement within ±5 %: common practice). */
export const DEFAULT_RECHECK: RecheckPolicy = { everyDays: 7, tolerancePct: 5 };

/** Default saturation threshold: raw peak absorbance above 1.0 (DESIGN §3). */
export const DEFAULT_SATURATION_ABSORBANCE = 1.0;

/** Settings shared by every method kind. */
export interface MethodCommon {
  /** Title, e.g. the analysis and the cell. */
  title?: string;
  /** Recheck schedule. */
  recheck: RecheckPolicy;
  /** Reference conditions to scale to; fields not given come from the standards' medians. */
  reference: PartialConditions;
  /** Raw absorbance above which a result is flagged `saturated`. */
  saturationAbsorbance: number;
  /** α for decision and detection limits (default 0.05). */
  detectionAlpha: number;
}

/** A gas calibrated from given responses (no spectra). */
export interface ResponseGasMethod {
  /** Canonical gas name. */
  name: string;
  /** Unit the concentrations are given and reported in. */
  unit: ConcentrationUnit;
  /** Curve form. */
  curve: CurveForm;
  /** Weighting. */
  weights: WeightScheme;
}

/** A gas calibrated from a baseline-corrected band. */
export interface BandGasMethod extends ResponseGasMethod {
  /** Integration window, cm⁻¹. */
  band: Window;
  /** Baseline windows, cm⁻¹. */
  baseline: Window[];
  /** Baseline polynomial order (0–3). */
  baselineOrder: number;
  /** Band area or peak height. */
  response: ResponseKind;
}

/** Band-area calibration of one or more gases, each on its own band. */
export interface BandMethod extends MethodCommon {
  model: 'band';
  gases: BandGasMethod[];
}

/** Calibration from tabulated responses (`calibrate --responses`). */
export interface ResponseMethod extends MethodCommon {
  model: 'responses';
  gases: [ResponseGasMethod];
}

/** A gas in a classical-least-squares method. */
export interface ClsGasMethod {
  /** Canonical gas name. */
  name: string;
  /** Unit concentrations are given and reported in. */
  unit: ConcentrationUnit;
  /** Add a quadratic term for this gas (saturating lines). */
  secondOrder: boolean;
}

/** Classical least squares over spectral regions. */
export interface ClsMethod extends MethodCommon {
  model: 'cls';
  /** Reported gases. */
  gases: ClsGasMethod[];
  /** Modelled but not reported components. */
  interferents: ClsGasMethod[];
  /** Spectral regions, cm⁻¹, not overlapping. */
  regions: Window[];
  /** Baseline polynomial order per region (0–3). */
  baselineOrder: number;
  /**
   * A constant background spectrum (absorbance) given a free coefficient in every spectrum, e.g.
   * a window deposit or a purge impurity: path relative to the method file, or absent.
   */
  background?: string;
}

/** Any method. */
export type Method = BandMethod | ResponseMethod | ClsMethod;

type Json = unknown;

function isObject(value: Json): value is Record<string, Json> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

class Checker {
  constructor(readonly source: string) {}

  fail(path: string, value: Json, rule: string, code: 'INVALID_VALUE' | 'PARSE' = 'INVALID_VALUE'): never {
    // JSON.parse reads 1e400 as Infinity, which JSON.stringify would show as null.
    const shown = JSON.stringify(value, (_key, inner: unknown) =>
      typeof inner === 'number' && !Number.isFinite(inner) ? String(inner) : inner,
    );
    throw new BandwrightError(
      code,
      `${this.source}: ${path} = ${shown === undefined ? 'missing' : shown}, ${rule}`,
      { file: this.source, parameter: path },
    );
  }

  object(value: Json, path: string): Record<string, Json> {
    if (!isObject(value)) this.fail(path, value, 'must be an object');
    return value;
  }

  onlyKeys(value: Record<string, Json>, path: string, allowed: readonly string[]): void {
    for (const key of Object.keys(value)) {
      if (!allowed.includes(key))
        this.fail(
          `${path === '' ? '' : `${path}.`}${key}`,
          value[key],
          `is not a known field here (known: ${allowed.join(', ')})`,
        );
    }
  }

  number(value: Json, path: string, rule: (n: number) => boolean, ruleText: string): number {
    if (typeof value !== 'number' || !Number.isFinite(value) || !rule(value))
      this.fail(path, value, ruleText);
    return value;
  }

  choice<T extends string>(value: Json, path: string, choices: readonly T[], fallback: T): T {
    if (value === undefined) return fallback;
    if (typeof value !== 'string' || !(choices as readonly string[]).includes(value))
      this.fail(path, value, `must be one of ${choices.join(', ')}`);
    return value as T;
  }

  window(value: Json, path: string): Window {
    if (!Array.isArray(value)) this.fail(path, value, 'must be [low, high] in cm⁻¹');
    assertWindow(value, `${this.source}: ${path}`);
    return [value[0], value[1]];
  }

  windows(value: Json, path: string): Window[] {
    if (value === undefined) return [];
    if (!Array.isArray(value)) this.fail(path, value, 'must be a list of [low, high] windows in cm⁻¹');
    return value.map((w, i) => this.window(w, `${path}[${i}]`));
  }

  gasName(value: Json, path: string): string {
    if (typeof value !== 'string' || value.trim() === '')
      this.fail(path, value, 'must be a gas name such as "CO"');
    return requireInfraredSpecies(value, `${this.source}: ${path}`).name;
  }

  unit(value: Json, path: string): ConcentrationUnit {
    if (value === undefined) return 'ppm';
    if (typeof value !== 'string') this.fail(path, value, 'must be ppm, ppb or pct');
    return parseConcentrationUnit(value, `${this.source}: ${path}`);
  }

  integer(value: Json, path: string, low: number, high: number, fallback: number): number {
    if (value === undefined) return fallback;
    return this.number(
      value,
      path,
      (n) => Number.isInteger(n) && n >= low && n <= high,
      `must be a whole number from ${low} to ${high}`,
    );
  }
}

/** Largest CUSUM reference value and decision interval accepted, in units of σ. */
const CUSUM_K_LIMIT = 3;
const CUSUM_H_LIMIT = 20;

function parseCusumPolicy(check: Checker, value: Json): CusumPolicy {
  const raw = check.object(value, 'recheck.cusum');
  check.onlyKeys(raw, 'recheck.cusum', ['k', 'h', 'onSignal']);
  const cusum: CusumPolicy = {};
  if (raw.k !== undefined)
    cusum.k = check.number(
      raw.k,
      'recheck.cusum.k',
      (n) => n >= 0 && n <= CUSUM_K_LIMIT,
      `must be a reference value in units of σ from 0 to ${CUSUM_K_LIMIT}`,
    );
  if (raw.h !== undefined)
    cusum.h = check.number(
      raw.h,
      'recheck.cusum.h',
      (n) => n > 0 && n <= CUSUM_H_LIMIT,
      `must be a decision interval in units of σ > 0 and at most ${CUSUM_H_LIMIT}`,
    );
  if (raw.onSignal !== undefined)
    cusum.onSignal = check.choice(raw.onSignal, 'recheck.cusum.onSignal', CUSUM_SIGNALS, 'warning');
  return cusum;
}

function parseCommon(check: Checker, root: Record<string, Json>): MethodCommon {
  const recheckRaw = root.recheck === undefined ? {} : check.object(root.recheck, 'recheck');
  check.onlyKeys(recheckRaw, 'recheck', ['everyDays', 'tolerancePct', 'sigmaFloorPct', 'cusum']);
  const recheck: RecheckPolicy = {
    everyDays:
      recheckRaw.everyDays === undefined
        ? DEFAULT_RECHECK.everyDays
        : check.number(
            recheckRaw.everyDays,
            'recheck.everyDays',
            (n) => n > 0,
            'must be a number of days > 0',
          ),
    tolerancePct:
      recheckRaw.tolerancePct === undefined
        ? DEFAULT_RECHECK.tolerancePct
        : check.number(
            recheckRaw.tolerancePct,
            'recheck.tolerancePct',
            (n) => n > 0 && n < 100,
            'must be a percentage > 0 and < 100',
          ),
  };
  if (recheckRaw.sigmaFloorPct !== undefined)
    recheck.sigmaFloorPct = check.number(
      recheckRaw.sigmaFloorPct,
      'recheck.sigmaFloorPct',
      (n) => n > 0 && n < recheck.tolerancePct,
      `must be a percentage > 0 and below the tolerance (${recheck.tolerancePct} %)`,
    );
  if (recheckRaw.cusum !== undefined) recheck.cusum = parseCusumPolicy(check, recheckRaw.cusum);
  const referenceRaw = root.reference === undefined ? {} : check.object(root.reference, 'reference');
  check.onlyKeys(referenceRaw, 'reference', ['pathLength_m', 'temperature_K', 'pressure_kPa']);
  const reference: PartialConditions = {};
  for (const field of ['pathLength_m', 'temperature_K', 'pressure_kPa'] as const) {
    if (referenceRaw[field] !== undefined)
      reference[field] = check.number(referenceRaw[field], `reference.${field}`, (n) => n > 0, 'must be > 0');
  }
  if (root.title !== undefined && typeof root.title !== 'string')
    check.fail('title', root.title, 'must be text');
  return {
    ...(typeof root.title === 'string' ? { title: root.title } : {}),
    recheck,
    reference,
    saturationAbsorbance:
      root.saturationAbsorbance === undefined
        ? DEFAULT_SATURATION_ABSORBANCE
        : check.number(
            root.saturationAbsorbance,
            'saturationAbsorbance',
            (n) => n > 0,
            'must be an absorbance > 0',
          ),
    detectionAlpha:
      root.detectionAlpha === undefined
        ? 0.05
        : check.number(
            root.detectionAlpha,
            'detectionAlpha',
            (n) => n > 0 && n < 0.5,
            'must be a probability between 0 and 0.5',
          ),
  };
}

const COMMON_KEYS = [
  'model',
  'gases',
  'recheck',
  'reference',
  'saturationAbsorbance',
  'detectionAlpha',
  'title',
];

/**
 * Validates a parsed method object.
 *
 * @param value - the parsed JSON
 * @param source - file name (or `options`) for messages
 * @returns the typed method with defaults filled in
 * @throws BandwrightError `INVALID_VALUE` naming the field, the value and the rule; `WINDOW` for
 *   inverted or overlapping windows; `UNKNOWN_GAS`, `IR_INACTIVE`
 */
export function parseMethod(value: Json, source: string): Method {
  const check = new Checker(source);
  const root = check.object(value, '(top level)');
  const model = check.choice(root.model, 'model', ['band', 'cls'] as const, 'band');
  const gasList: Json[] =
    Array.isArray(root.gases) && root.gases.length > 0
      ? root.gases
      : check.fail('gases', root.gases, 'must be a non-empty list of gases');
  const common = parseCommon(check, root);
  const seen = new Set<string>();
  const unique = (name: string, path: string): string => {
    if (seen.has(name)) check.fail(path, name, 'appears twice; list each gas once');
    seen.add(name);
    return name;
  };

  if (model === 'band') {
    check.onlyKeys(root, '', COMMON_KEYS);
    const gases = gasList.map((raw, i): BandGasMethod => {
      const path = `gases[${i}]`;
      const gas = check.object(raw, path);
      check.onlyKeys(gas, path, [
        'name',
        'unit',
        'band',
        'baseline',
        'baselineOrder',
        'response',
        'model',
        'weights',
      ]);
      const band = check.window(gas.band, `${path}.band`);
      const baseline = check.windows(gas.baseline, `${path}.baseline`);
      assertBandWindows(band, baseline, `${source}: ${path}`);
      return {
        name: unique(check.gasName(gas.name, `${path}.name`), `${path}.name`),
        unit: check.unit(gas.unit, `${path}.unit`),
        band,
        baseline,
        baselineOrder: check.integer(gas.baselineOrder, `${path}.baselineOrder`, 0, 3, 1),
        response: check.choice(gas.response, `${path}.response`, ['area', 'height'] as const, 'area'),
        curve: check.choice(gas.model, `${path}.model`, CURVE_FORMS, 'linear'),
        weights: check.choice(gas.weights, `${path}.weights`, WEIGHT_SCHEMES, 'none'),
      };
    });
    return { model: 'band', gases, ...common };
  }

  check.onlyKeys(root, '', [...COMMON_KEYS, 'regions', 'baselineOrder', 'interferents', 'background']);
  const component = (raw: Json, path: string): ClsGasMethod => {
    if (typeof raw === 'string')
      return { name: unique(check.gasName(raw, path), path), unit: 'ppm', secondOrder: false };
    const gas = check.object(raw, path);
    check.onlyKeys(gas, path, ['name', 'unit', 'secondOrder']);
    if (gas.secondOrder !== undefined && typeof gas.secondOrder !== 'boolean')
      check.fail(`${path}.secondOrder`, gas.secondOrder, 'must be true or false');
    return {
      name: unique(check.gasName(gas.name, `${path}.name`), `${path}.name`),
      unit: check.unit(gas.unit, `${path}.unit`),
      secondOrder: gas.secondOrder === true,
    };
  };
  const gases = gasList.map((raw, i) => component(raw, `gases[${i}]`));
  const interferentList: Json[] =
    root.interferents === undefined
      ? []
      : Array.isArray(root.interferents)
        ? root.interferents
        : check.fail('interferents', root.interferents, 'must be a list of gas names');
  const interferents = interferentList.map((raw, i) => component(raw, `interferents[${i}]`));
  const regions = check.windows(root.regions, 'regions');
  if (regions.length === 0)
    check.fail('regions', root.regions, 'must list at least one spectral region [low, high] in cm⁻¹');
  regions.forEach((region, i) => {
    for (let j = 0; j < i; j++) {
      if (windowsOverlap(region, regions[j] as Window)) {
        throw new BandwrightError(
          'WINDOW',
          `${source}: regions[${j}] = ${formatWindow(regions[j] as Window)} and regions[${i}] = ` +
            `${formatWindow(region)} overlap; merge them or separate them`,
          { file: source, parameter: 'regions' },
        );
      }
    }
  });
  if (
    root.background !== undefined &&
    (typeof root.background !== 'string' || root.background.trim() === '')
  ) {
    check.fail(
      'background',
      root.background,
      'must be the path of a background absorbance scan, relative to the method file',
    );
  }
  return {
    model: 'cls',
    gases,
    interferents,
    regions: [...regions].sort((a, b) => a[0] - b[0]),
    baselineOrder: check.integer(root.baselineOrder, 'baselineOrder', 0, 3, 1),
    ...(typeof root.background === 'string' ? { background: root.background } : {}),
    ...common,
  };
}

/**
 * Validates a one-gas method for tabulated responses (`calibrate --responses`).
 *
 * @param value - `{ name, unit?, model?, weights?, recheck?, detectionAlpha? }` as parsed JSON or built from flags
 * @param source - where it came from, for messages (e.g. `options`)
 * @returns the typed response method
 * @throws BandwrightError as {@link parseMethod}
 */
export function parseResponseMethod(value: Json, source: string): ResponseMethod {
  const check = new Checker(source);
  const root = check.object(value, '(top level)');
  check.onlyKeys(root, '', [
    'name',
    'unit',
    'model',
    'weights',
    'recheck',
    'reference',
    'detectionAlpha',
    'title',
  ]);
  return {
    model: 'responses',
    gases: [
      {
        name: check.gasName(root.name, 'gas'),
        unit: check.unit(root.unit, 'unit'),
        curve: check.choice(root.model, 'model', CURVE_FORMS, 'linear'),
        weights: check.choice(root.weights, 'weights', WEIGHT_SCHEMES, 'none'),
      },
    ],
    ...parseCommon(check, root),
  };
}
