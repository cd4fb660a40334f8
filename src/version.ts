/** The tool's name and version, stamped into every calibration and result. Kept equal to package.json by a test. */
export const TOOL = { name: 'bandwright', version: '0.1.0' } as const;
