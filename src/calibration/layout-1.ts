/**
 * Calibration files of schema 1.x (written by bandwright 0.1), read into the current layout.
 *
 * What changed in schema 2.0:
 * - A univariate model names its residual degrees of freedom `degreesOfFreedom` (was `df`) and its
 *   number of standards `standards` (was `n`), as the CLS models do; so do the Mandel test
 *   (`mandel.degreesOfFreedom`, was `mandel.df`) and the limits (`limits.degreesOfFreedom`, was
 *   `limits.df`) it carries.
 * - A CLS model holds what was fitted and nothing derived from it: `predictionMatrix`,
 *   `responseFactor`, `noiseGram`, `sampleResidualCount` and `sampleDegreesOfFreedom` are rebuilt
 *   from the pure spectra and the noise model when the model is first used, and `formatVersion`
 *   is gone (the file's `schemaVersion` versions the layout).
 *
 * The conversion is done in memory, after the file's recorded hash has been checked against the
 * content as written, and before the shape checks; the file is never rewritten. The converted
 * calibration keeps its `schemaVersion` and `sha256` as recorded, so results and recheck histories
 * still name the file the user has.
 */

type Json = unknown;

function isObject(value: Json): value is Record<string, Json> {
  return typeof value === 'object' && value !== null && !Array.isArray(value);
}

/** Fields of a schema-1 CLS model that the current layout derives instead of storing. */
const DERIVED_CLS_FIELDS = [
  'formatVersion',
  'predictionMatrix',
  'responseFactor',
  'noiseGram',
  'sampleResidualCount',
  'sampleDegreesOfFreedom',
] as const;

/** A copy of `record` with `from` renamed to `to` (keys keep their order); unchanged if absent. */
function renamed(record: Record<string, Json>, from: string, to: string): Record<string, Json> {
  if (!(from in record)) return record;
  return Object.fromEntries(Object.entries(record).map(([key, value]) => [key === from ? to : key, value]));
}

function upgradeUnivariateModel(value: Json): Json {
  if (!isObject(value)) return value;
  let model = renamed(renamed(value, 'df', 'degreesOfFreedom'), 'n', 'standards');
  if (isObject(model.mandel)) model = { ...model, mandel: renamed(model.mandel, 'df', 'degreesOfFreedom') };
  if (isObject(model.limits)) model = { ...model, limits: renamed(model.limits, 'df', 'degreesOfFreedom') };
  return model;
}

function upgradeClsModel(value: Json): Json {
  if (!isObject(value)) return value;
  const model = { ...value };
  for (const field of DERIVED_CLS_FIELDS) delete model[field];
  return model;
}

/**
 * Converts a parsed calibration of schema 1.x to the current layout. Pure: the input is not
 * modified; parts that are not of the expected shape are left as they are for the shape checks to
 * name.
 *
 * @param record - the parsed calibration (hash already verified)
 * @returns a new object in the current layout, with the recorded `schemaVersion` and `sha256`
 */
export function upgradeLayout1(record: Record<string, Json>): Record<string, Json> {
  const upgraded: Record<string, Json> = { ...record };
  if (Array.isArray(record.gases)) {
    upgraded.gases = record.gases.map((gas: Json) =>
      isObject(gas) && 'model' in gas ? { ...gas, model: upgradeUnivariateModel(gas.model) } : gas,
    );
  }
  if (isObject(record.cls) && 'model' in record.cls) {
    upgraded.cls = { ...record.cls, model: upgradeClsModel(record.cls.model) };
  }
  return upgraded;
}
