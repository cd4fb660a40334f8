/**
 * The blocks of a JCAMP-DX file and what each holds. A file is one block (`##TITLE=` … `##END=`)
 * or a compound file: a `##DATA TYPE=LINK` block whose `##BLOCKS=` children follow it (each
 * closed by its own `##END=`), or plain blocks one after another. A reader of infrared spectra
 * opens a file that holds exactly one infrared spectrum; everything else is refused with what the
 * file holds (NMR, mass spectrum, UV/Vis …) named, never with a parse error about a unit.
 */
import { BandwrightError, type FileContent } from '../../errors.js';
import type { JcampRecord } from './records.js';

/** One block: its records from `##TITLE=` to its `##END=`, and the blocks nested in it. */
export interface JcampBlock {
  /** The block's own records (not those of nested blocks), `##TITLE=` first when it has one. */
  records: JcampRecord[];
  /** Blocks opened inside this one (the children of a LINK block). */
  children: JcampBlock[];
}

/**
 * Groups records into blocks: `##TITLE=` opens a block (inside the one still open, if any),
 * `##END=` closes the innermost. A stray `##END=` with no block open closes nothing.
 *
 * @param records - every record of the file, in order
 * @returns the top-level blocks
 */
export function splitBlocks(records: readonly JcampRecord[]): JcampBlock[] {
  const top: JcampBlock[] = [];
  const open: JcampBlock[] = [];
  for (const record of records) {
    if (record.key === 'TITLE' || open.length === 0) {
      if (record.key === 'END') continue;
      const block: JcampBlock = { records: [], children: [] };
      (open.length === 0 ? top : (open[open.length - 1] as JcampBlock).children).push(block);
      open.push(block);
    }
    (open[open.length - 1] as JcampBlock).records.push(record);
    if (record.key === 'END') open.pop();
  }
  return top;
}

/**
 * The blocks that hold data of their own (no nested blocks), depth first.
 *
 * @param blocks - top-level blocks
 * @returns the leaves
 */
export function leafBlocks(blocks: readonly JcampBlock[]): JcampBlock[] {
  return blocks.flatMap((block) => (block.children.length === 0 ? [block] : leafBlocks(block.children)));
}

/** What a block holds when it is not an infrared spectrum: the kind and a phrase for people. */
interface Content {
  kind: FileContent;
  what: string;
}

function valueOf(block: JcampBlock, key: string): string | undefined {
  return block.records.find((record) => record.key === key)?.value.trim();
}

/** Squeezes a unit text for comparison: upper case, no spaces or brackets. */
function squeezed(text: string | undefined): string {
  return (text ?? '').toUpperCase().replace(/[\s()[\]]+/g, '');
}

const DATA_TYPE_KINDS: readonly [RegExp, FileContent, string][] = [
  [/NMR|NUCLEAR MAGNETIC/, 'nmr', 'an NMR spectrum or FID'],
  [/MASS/, 'mass-spectrum', 'a mass spectrum'],
  [/ION MOBILITY|\bIMS\b/, 'other', 'an ion-mobility spectrum'],
  [/UV|ULTRAVIOLET|VIS/, 'uv-vis', 'a UV/Vis spectrum'],
  [/RAMAN/, 'raman', 'a Raman spectrum'],
  [/REFLECT/, 'reflectance', 'a reflectance spectrum'],
  [/CHROMATOGRAM|\bGC\b|\bLC\b|HPLC/, 'chromatogram', 'a chromatogram'],
  [/PEAK (TABLE|ASSIGNMENT)/, 'peak-table', 'a peak table'],
  [/EPR|ESR|ELECTRON (PARAMAGNETIC|SPIN)/, 'other', 'an EPR spectrum'],
  [/X-?RAY|XRD|DIFFRACT/, 'other', 'an X-ray pattern'],
  [/XPS|PHOTOELECTRON/, 'other', 'a photoelectron spectrum'],
  [/THERMO|TGA|DSC/, 'other', 'a thermal analysis curve'],
  [/VOLTAM|CV\b|ELECTROCHEM/, 'other', 'an electrochemical curve'],
  [/ISOTHERM|ADSORPTION/, 'other', 'an adsorption isotherm'],
];

const X_UNIT_KINDS: readonly [RegExp, FileContent, string][] = [
  [/^(HZ|PPM)$/, 'nmr', 'an NMR spectrum (x in Hz or ppm)'],
  [/^M\/Z$/, 'mass-spectrum', 'a mass spectrum (x in m/z)'],
  [/^(SECONDS|MINUTES|MILLISECONDS|S|MIN|MS|TIME)$/, 'chromatogram', 'a time trace (x in time)'],
  [/^(GAUSS|TESLA|MT)$/, 'other', 'an EPR spectrum (x in field units)'],
];

/**
 * What a block holds when it is not a candidate infrared spectrum, from `##DATA TYPE`, NTUPLES,
 * its axis units and its data table.
 *
 * @param block - a leaf block
 * @returns the content when the block is not an infrared spectrum; undefined for a candidate
 *   (whose header is then checked in full)
 */
export function nonInfraredContent(block: JcampBlock): Content | undefined {
  const dataType = (valueOf(block, 'DATATYPE') ?? '').toUpperCase();
  const infrared = /INFRARED|\bIR\b|FT-?IR|NIR/.test(dataType);
  if (!infrared) {
    for (const [pattern, kind, what] of DATA_TYPE_KINDS) if (pattern.test(dataType)) return { kind, what };
  }
  if (block.records.some((record) => record.key === 'NTUPLES')) {
    return {
      kind: 'multidimensional',
      what: 'NTUPLES data (several pages or dimensions, e.g. an FID or a series)',
    };
  }
  const xUnits = squeezed(valueOf(block, 'XUNITS'));
  for (const [pattern, kind, what] of X_UNIT_KINDS) if (pattern.test(xUnits)) return { kind, what };
  const yUnits = squeezed(valueOf(block, 'YUNITS'));
  if (/REFLECT/.test(yUnits)) return { kind: 'reflectance', what: 'a reflectance spectrum' };
  if (/LOG.?EPSILON|MOLARABSORPTIVITY/.test(yUnits)) {
    return { kind: 'uv-vis', what: 'a UV/Vis spectrum in molar absorptivity' };
  }
  const hasTable = block.records.some((record) => record.key === 'XYDATA' || record.key === 'XYPOINTS');
  if (!hasTable && block.records.some((r) => r.key === 'PEAKTABLE' || r.key === 'PEAKASSIGNMENTS')) {
    return { kind: 'peak-table', what: 'a peak table (a list of peaks, not a spectrum)' };
  }
  if (!infrared && dataType !== '' && !/SPECTRUM/.test(dataType)) {
    return { kind: 'other', what: `data of type "${valueOf(block, 'DATATYPE')}"` };
  }
  return undefined;
}

/** Why a file is refused for what it holds. */
function refuse(source: string, line: number, content: Content, rest: string): never {
  throw new BandwrightError(
    'UNSUPPORTED',
    `${source} line ${line}: holds ${content.what}${rest}; bandwright reads single infrared ` +
      'absorbance or transmittance spectra',
    { file: source, line, content: content.kind },
  );
}

/**
 * The one block of a file to read as an infrared spectrum.
 *
 * @param blocks - the file's top-level blocks
 * @param source - label for messages
 * @returns the block, and a note when it was taken from a compound file
 * @throws BandwrightError `UNSUPPORTED` (with `content`) when the file holds no infrared spectrum
 *   or several; `PARSE` when it holds no block at all
 */
export function infraredBlock(
  blocks: readonly JcampBlock[],
  source: string,
): { block: JcampBlock; compoundNote?: string } {
  const leaves = leafBlocks(blocks);
  const first = leaves[0];
  if (first === undefined) {
    throw new BandwrightError(
      'PARSE',
      `${source}: no JCAMP-DX labels; a JCAMP-DX file starts with ##TITLE=`,
      {
        file: source,
      },
    );
  }
  const lineOf = (block: JcampBlock): number => block.records[0]?.line ?? 1;
  const opening = blocks[0]?.records[0];
  if (opening !== undefined && opening.key !== 'TITLE') {
    throw new BandwrightError(
      'PARSE',
      `${source} line ${opening.line}: first label is ##${opening.name}, must be ##TITLE= (then ##JCAMP-DX=)`,
      { file: source, line: opening.line },
    );
  }
  if (leaves.length === 1 && blocks.length === 1) {
    const content = nonInfraredContent(first);
    if (content !== undefined) refuse(source, lineOf(first), content, '');
    return { block: first };
  }
  // In a compound file, blocks without a data table (structures, links) are not spectra.
  const contents = leaves.map(nonInfraredContent);
  const candidates = leaves.filter(
    (leaf, i) =>
      contents[i] === undefined &&
      leaf.records.some((record) => record.key === 'XYDATA' || record.key === 'XYPOINTS'),
  );
  const only = candidates[0];
  if (only !== undefined && candidates.length === 1) {
    return {
      block: only,
      compoundNote:
        `${source}: a compound file of ${leaves.length} blocks; read the one infrared spectrum in it, ` +
        `"${valueOf(only, 'TITLE') ?? ''}" (line ${lineOf(only)}); the other blocks are ignored`,
    };
  }
  if (candidates.length > 1) {
    refuse(
      source,
      lineOf(candidates[1] as JcampBlock),
      { kind: 'several-spectra', what: `${candidates.length} spectra in ${leaves.length} blocks` },
      ' (a compound file)',
    );
  }
  const typedIndex = contents.findIndex((content) => content !== undefined);
  const typed = leaves[typedIndex];
  const content = contents[typedIndex] ?? { kind: 'other', what: 'no data table in any block' };
  refuse(
    source,
    lineOf(typed ?? first),
    content,
    ` (a compound file of ${leaves.length} blocks, none infrared)`,
  );
}
