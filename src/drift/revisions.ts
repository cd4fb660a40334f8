/**
 * Checks whose verdict now differs from the one recorded, and why: a different tolerance, a check
 * recorded later for an earlier time (the history is judged in time order, so a late entry changes
 * what the checks after it are judged with), or rules that differ from those the check was
 * recorded with. Pure.
 */
import type { RecheckPolicy } from '../calibration/method.js';
import { checkLabel, judgeSeries, pct, type EvaluatedCheck, type JudgedSeries } from './judge.js';
import type { CheckRecord, Verdict } from './record.js';
import type { SigmaSource } from './sigma.js';

/** Why a verdict differs from the one recorded. */
export type RevisionCause = 'tolerance' | 'late-entry' | 'rules';

/** A check judged differently now from when it was recorded. */
export interface VerdictRevision {
  /** Position of the check in the evaluation's `checks`. */
  index: number;
  /** The check's time, ISO. */
  time: string;
  /** Its line in the history file, when read from one. */
  line?: number;
  /** The verdict recorded. */
  recorded: Verdict;
  /** The verdict now. */
  now: Verdict;
  /** Why they differ. */
  cause: RevisionCause;
  /** For `late-entry`: the checks recorded after this one for earlier times, oldest time first. */
  lateEntries: { time: string; recordedAt: string; line?: number }[];
}

const SOURCE_WORDS: Record<SigmaSource, string> = {
  baseline: 'the baseline SD',
  'check-se': "the check's own standard error",
  floor: 'the floor',
};

function ms(iso: string): number {
  return Date.parse(iso);
}

/** The records that came before `record` in time but were recorded after it. */
function lateBefore(record: CheckRecord, ordered: readonly CheckRecord[]): CheckRecord[] {
  const time = ms(record.time);
  const recordedAt = ms(record.recordedAt);
  if (!Number.isFinite(recordedAt)) return [];
  return ordered.filter((r) => r !== record && ms(r.time) < time && ms(r.recordedAt) > recordedAt);
}

/**
 * The checks of a judged series whose verdict differs from the recorded one, each with its cause.
 * A difference is put down to late entries only when judging the records that existed when the
 * check was recorded (recorded no later than it) gives the recorded verdict again.
 *
 * @param ordered - the gas's records in time order (those `series` was judged from)
 * @param series - the judged series
 * @param policy - the policy it was judged with
 * @param baselineSize - baseline size it was judged with
 * @returns the revisions, in time order
 */
export function verdictRevisions(
  ordered: readonly CheckRecord[],
  series: JudgedSeries,
  policy: RecheckPolicy,
  baselineSize: number,
): VerdictRevision[] {
  return series.checks
    .filter((check) => check.verdict !== check.record.verdict)
    .map((check) => {
      const record = check.record;
      const revision: VerdictRevision = {
        index: check.index,
        time: record.time,
        recorded: record.verdict,
        now: check.verdict,
        cause: 'rules',
        lateEntries: [],
      };
      if (record.line !== undefined) revision.line = record.line;
      if (record.tolerancePct !== policy.tolerancePct) {
        revision.cause = 'tolerance';
        return revision;
      }
      const late = lateBefore(record, ordered);
      if (late.length === 0) return revision;
      const cutoff = ms(record.recordedAt);
      const known = ordered.filter((r) => r === record || ms(r.recordedAt) <= cutoff);
      const then = judgeSeries(known, policy, baselineSize).checks.find((c) => c.record === record);
      if (then?.verdict === record.verdict) {
        revision.cause = 'late-entry';
        revision.lateEntries = late.map((r) => ({
          time: r.time,
          recordedAt: r.recordedAt,
          ...(r.line === undefined ? {} : { line: r.line }),
        }));
      }
      return revision;
    });
}

function where(line: number | undefined): string {
  return line === undefined ? '' : ` (history line ${line})`;
}

function lateText(entries: VerdictRevision['lateEntries']): string {
  const each = entries.map(
    (e) => `${checkLabel(e)}${where(e.line)}, recorded on ${e.recordedAt.slice(0, 10)} for an earlier time`,
  );
  return `${each.join('; ')}, now ${entries.length === 1 ? 'comes' : 'come'} before it`;
}

/**
 * One note per revision, worded with its cause; checks revised because the rules differ from
 * those they were recorded with are grouped by recorded and present verdict into one note.
 *
 * @param revisions - from {@link verdictRevisions}
 * @param checks - the evaluation's checks (for σ now)
 * @param tolerancePct - the tolerance judged with, ± %
 * @returns notes in plain words, in time order of their first check
 */
export function revisionNotes(
  revisions: readonly VerdictRevision[],
  checks: readonly EvaluatedCheck[],
  tolerancePct: number,
): string[] {
  const notes: string[] = [];
  const grouped = new Map<string, VerdictRevision[]>();
  for (const revision of revisions) {
    const check = checks[revision.index] as EvaluatedCheck;
    const head = `${checkLabel(revision)}${where(revision.line)} was recorded as ${revision.recorded}`;
    if (revision.cause === 'tolerance') {
      notes.push(
        `${head} (tolerance ±${check.record.tolerancePct} %) and is judged ${revision.now} now ` +
          `(tolerance ±${tolerancePct} %)`,
      );
    } else if (revision.cause === 'late-entry') {
      notes.push(`${head} and is judged ${revision.now} now: ${lateText(revision.lateEntries)}`);
    } else {
      const key = `${revision.recorded}>${revision.now}`;
      const group = grouped.get(key);
      if (group === undefined) {
        grouped.set(key, [revision]);
        notes.push(key);
      } else group.push(revision);
    }
  }
  return notes.map((note) => {
    const group = grouped.get(note);
    if (group === undefined) return note;
    const first = group[0] as VerdictRevision;
    const why = 'the σ and control rules in force now differ from those it was recorded with';
    if (group.length === 1) {
      const check = checks[first.index] as EvaluatedCheck;
      const then = check.record.sigmaPct === undefined ? '' : ` (σ then ${pct(check.record.sigmaPct, 3)} %)`;
      const now =
        check.sigma === undefined
          ? ''
          : ` (σ ${pct(check.sigma.valuePct, 3)} %, set by ${SOURCE_WORDS[check.sigma.basis]})`;
      return (
        `${checkLabel(first)}${where(first.line)} was recorded as ${first.recorded}${then} ` +
        `and is judged ${first.now} now${now}: ${why}`
      );
    }
    const shown = group.slice(0, 6).map((r) => r.time.slice(0, 10));
    const more = group.length > shown.length ? ` and ${group.length - shown.length} more` : '';
    return (
      `${group.length} checks (${shown.join(', ')}${more}) were recorded as ${first.recorded} and are ` +
      `judged ${first.now} now: the σ and control rules in force now differ from those they were recorded with`
    );
  });
}
