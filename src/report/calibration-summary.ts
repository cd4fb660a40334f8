/**
 * A calibration described in plain text: per gas the curve, its statistics, the linearity
 * verdict and the limits (each with its definition), then conditions, schedule, warnings and cautions.
 */
import type { Calibration, ClsCalibration, GasCalibration } from '../calibration/calibration.js';
import { formatWindow } from '../bands/windows.js';
import { unitLabel } from '../gas/units.js';
import { formatNumber } from './table.js';

const CURVE_WORDS = {
  linear: 'straight line r = a + b·c',
  origin: 'straight line through the origin r = b·c',
  quadratic: 'second order r = a + b·c + c2·c²',
} as const;

function gasSummary(gas: GasCalibration): string[] {
  const model = gas.model;
  const unit = unitLabel(gas.unit);
  const lines: string[] = [];
  const feature = gas.feature;
  const where =
    feature === undefined
      ? 'from tabulated responses'
      : `${feature.response === 'area' ? 'band area' : 'peak height'} over ${formatWindow(feature.band)}` +
        `${
          feature.baseline.length > 0
            ? `, baseline order ${feature.baselineOrder} ` +
              `through ${feature.baseline.map(formatWindow).join(', ')}`
            : ', no baseline correction'
        }`;
  lines.push(`${gas.gas}: ${where}`);
  lines.push(
    `  curve: ${CURVE_WORDS[model.form]}, ` +
      `${model.weights === 'none' ? 'unweighted' : `weighted ${model.weights}`}; ` +
      `${model.standards} standards at ${model.levels.length} levels, ` +
      `${formatNumber(model.range[0])}–${formatNumber(model.range[1])} ${unit}`,
  );
  const coefficient = (name: 'a' | 'b' | 'c', label: string): string =>
    `${label} = ${formatNumber(model.coefficients[name], 6)} ± ${formatNumber(model.standardErrors[name], 2)}`;
  lines.push(
    `  coefficients: ${model.parameters.map((p) => coefficient(p, p === 'c' ? 'c2' : p)).join(', ')}`,
  );
  lines.push(
    `  residual SD ${formatNumber(model.residualSD, 4)} (df ${model.degreesOfFreedom}), ` +
      `R² ${model.rSquared.toFixed(6)} (${model.rSquaredKind}), ` +
      `condition number ${formatNumber(model.conditionNumber, 3)}`,
  );
  if (model.mandel !== null) lines.push(`  linearity (Mandel test): ${model.mandel.recommendation}`);
  const limit = (name: string, value: number | null): string =>
    `${name} ${value === null ? 'not available' : `${formatNumber(value, 3)} ${unit}`}`;
  const limits = model.limits;
  lines.push(
    `  limits: ${limit('decision', limits.decision.value)}, ${limit('detection', limits.detection.value)}, ` +
      `${limit('determination', limits.determination.value)}`,
  );
  lines.push(`    (${limits.detection.definition})`);
  lines.push(
    `  simple limits: ${limit('3.3σ/b', limits.ichDetection.value)}, ` +
      `${limit('10σ/b', limits.ichQuantitation.value)} (ICH Q2)`,
  );
  if (gas.zeroGasLimit !== undefined)
    lines.push(
      `  zero-gas limit: ${formatNumber(gas.zeroGasLimit.value, 3)} ${unit} (${gas.zeroGasLimit.definition})`,
    );
  for (const warning of model.warnings) lines.push(`  note: ${warning}`);
  return lines;
}

function clsSummary(cls: ClsCalibration): string[] {
  const model = cls.model;
  const statistics = model.calibration;
  const lines = [
    `classical least squares over ${cls.regions.map(formatWindow).join(', ')} ` +
      `(${model.channelCount} channels), baseline order ${model.baselineOrder} per region` +
      `${model.background === null ? '' : ', with a background spectrum'}`,
    `  ${statistics.standards} standards; residual RMS ${formatNumber(statistics.residualRms, 3)} AU; ` +
      `condition numbers: concentrations ${formatNumber(statistics.conditionConcentrations, 3)}, ` +
      `pure spectra ${formatNumber(statistics.conditionPureSpectra, 3)}`,
  ];
  model.components.forEach((component, i) => {
    const range = model.ranges[i];
    const rmsecv = model.crossValidation.rmsecv[i];
    const inflation = model.crossValidation.inflation[i] ?? 1;
    const second = model.terms.some((t) => t.component === i && t.power === 2);
    const limit = cls.detectionLimits[component.name];
    const unit = component.unit === 'pct' ? '%' : component.unit;
    lines.push(
      `  ${component.name}${component.reported ? '' : ' (interferent, not reported)'}: ` +
        `${second ? 'first and second order' : 'first order'}, ` +
        `standards ` +
        `${range === undefined ? '?' : `${formatNumber(range.min)}–${formatNumber(range.max)}`} ${unit}` +
        `${rmsecv === null || rmsecv === undefined ? '' : `, RMSECV ${formatNumber(rmsecv, 3)} ${unit}`}` +
        `${
          inflation > 1
            ? `, intervals widened ×${inflation.toFixed(2)} (leave-one-out errors larger than predicted)`
            : ''
        }` +
        `${limit === undefined ? '' : `, detection limit ${formatNumber(limit, 3)} ${unit} at reference conditions`}`,
    );
  });
  return lines;
}

/**
 * Formats a calibration summary.
 *
 * @param calibration - a calibration
 * @returns multi-line text
 */
export function formatCalibrationSummary(calibration: Calibration): string {
  const reference = calibration.reference;
  const lines = [
    `Calibration${calibration.title === undefined ? '' : ` "${calibration.title}"`} ` +
      `(${calibration.method.model}), ` +
      `built ${calibration.createdAt} by ${calibration.tool.name} ${calibration.tool.version}`,
    '',
    ...calibration.gases.flatMap((gas) => [...gasSummary(gas), '']),
    ...(calibration.cls === undefined ? [] : [...clsSummary(calibration.cls), '']),
    `Reference conditions: path ${reference.pathLength_m} m, ` +
      `${formatNumber(reference.temperature_K, 5)} K, ${formatNumber(reference.pressure_kPa, 6)} kPa ` +
      `(responses are scaled by φ = (L/L_ref)(P/P_ref)(T_ref/T))`,
    `Recheck: every ${calibration.method.recheck.everyDays} days, ` +
      `tolerance ±${calibration.method.recheck.tolerancePct} %`,
  ];
  if (calibration.warnings.length > 0)
    lines.push('', 'Warnings:', ...calibration.warnings.map((w) => `  ${w}`));
  if (calibration.cautions.length > 0)
    lines.push('', 'Caution:', ...calibration.cautions.map((c) => `  ${c}`));
  return lines.join('\n');
}
