/**
 * Control rules, each on a sequence made for it and on its near miss.
 *
 * Source of the rule definitions: Westgard, Barry, Hunt & Groth, "A multi-rule Shewhart chart for
 * quality control in clinical chemistry", Clinical Chemistry 27 (1981) 493 (as summarised in
 * ../shared/reference/facts.md): 1-2s warning, one beyond ±2s; reject on 1-3s one beyond ±3s,
 * 2-2s two consecutive beyond the same ±2s, R-4s one above +2s and one below −2s, 4-1s four
 * consecutive beyond the same ±1s, 10-x ten consecutive on the same side of the mean. Values are
 * in units of s (z-scores) around the mean; "beyond" is strict.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CONTROL_RULES, controlRulesAt } from '../../src/drift/rules.js';
import type { ControlRuleName } from '../../src/drift/record.js';

/** Rules that fire at the last value of the sequence. */
function firedAtEnd(z: number[]): ControlRuleName[] {
  return controlRulesAt(z, z.length - 1).map((f) => f.rule);
}

describe('each rule fires on its sequence and not on its near miss (Westgard et al. 1981)', () => {
  const cases: { rule: ControlRuleName; fires: number[]; nearMiss: number[]; why: string }[] = [
    {
      rule: '1-2s',
      fires: [0.3, -2.05],
      nearMiss: [0.3, -1.99],
      why: 'one value beyond −2s vs one just inside',
    },
    { rule: '1-2s', fires: [2.01], nearMiss: [2], why: 'exactly at +2s is not beyond it' },
    { rule: '1-3s', fires: [0.5, 3.02], nearMiss: [0.5, 2.98], why: 'beyond +3s vs just inside' },
    { rule: '1-3s', fires: [-3.5], nearMiss: [-3], why: 'below −3s vs on the limit' },
    {
      rule: '2-2s',
      fires: [0.2, 2.3, 2.1],
      nearMiss: [0.2, 2.3, 1.9],
      why: 'two consecutive beyond +2s vs the second just inside',
    },
    {
      rule: '2-2s',
      fires: [-2.2, -2.4],
      nearMiss: [2.2, 0.5, 2.4],
      why: 'two beyond −2s vs two beyond +2s that are not consecutive',
    },
    {
      rule: 'R-4s',
      fires: [2.2, -2.1],
      nearMiss: [2.2, -1.9],
      why: 'one above +2s then one below −2s vs the second just inside',
    },
    {
      rule: 'R-4s',
      fires: [-2.5, 2.5],
      nearMiss: [-2.5, 0, 2.5],
      why: 'reverse order vs not consecutive (one check per run: across two consecutive checks)',
    },
    {
      rule: '4-1s',
      fires: [0, 1.1, 1.5, 1.2, 1.05],
      nearMiss: [0, 1.1, 1.5, 1.2, 0.95],
      why: 'four consecutive beyond +1s vs the fourth just inside',
    },
    {
      rule: '4-1s',
      fires: [-1.2, -1.3, -1.1, -1.4],
      nearMiss: [-1.2, -1.3, 1.1, -1.4],
      why: 'four beyond −1s vs one on the other side',
    },
    {
      rule: '10-x',
      fires: [-0.5, 0.2, 0.4, 0.1, 0.3, 0.5, 0.2, 0.6, 0.1, 0.3, 0.4],
      nearMiss: [0.2, 0.4, 0.1, 0.3, 0.5, 0.2, 0.6, 0.1, 0.3, -0.4],
      why: 'ten above the mean vs nine above then one below',
    },
    {
      rule: '10-x',
      fires: new Array<number>(10).fill(-0.3),
      nearMiss: [...new Array<number>(9).fill(-0.3), 0],
      why: 'ten below vs nine below and one on the mean (not on either side)',
    },
  ];
  it.each(cases)('$rule: $why', ({ rule, fires, nearMiss }) => {
    expect(firedAtEnd(fires), `sequence ${fires.join(', ')}`).toContain(rule);
    expect(firedAtEnd(nearMiss), `near miss ${nearMiss.join(', ')}`).not.toContain(rule);
  });

  it('rates 1-2s as the warning and the others as reject rules', () => {
    expect(CONTROL_RULES['1-2s'].severity).toBe('warning');
    for (const rule of ['1-3s', '2-2s', 'R-4s', '4-1s', '10-x'] as const)
      expect(CONTROL_RULES[rule].severity).toBe('reject');
  });
});

describe('rule firings say which checks and why', () => {
  it('names the checks and the limit in the reason, with the checks involved', () => {
    const firings = controlRulesAt([0.1, -2.3, -2.6], 2, { labels: ['a', 'b', 'c'] });
    const twoTwo = firings.find((f) => f.rule === '2-2s');
    expect(twoTwo?.checks).toEqual([1, 2]);
    expect(twoTwo?.reason).toBe('b (−2.30σ) and c (−2.60σ) are both beyond −2σ');
    const tenFirings = controlRulesAt(new Array<number>(12).fill(0.5), 11);
    expect(tenFirings.find((f) => f.rule === '10-x')?.checks).toEqual([2, 3, 4, 5, 6, 7, 8, 9, 10, 11]);
    expect(tenFirings.find((f) => f.rule === '10-x')?.reason).toBe(
      'check 3 to check 12: ten consecutive checks above the certified value',
    );
  });

  it('looks only backwards: a later value does not change the judgement of an earlier check', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 2, maxLength: 25 }),
        fc.integer({ min: 0, max: 24 }),
        (z, at) => {
          const index = at % z.length;
          const alone = controlRulesAt(z.slice(0, index + 1), index);
          const withLater = controlRulesAt(z, index);
          expect(withLater).toEqual(alone);
        },
      ),
      { seed: 20260901, numRuns: 300 },
    );
  });

  it('is symmetric: mirroring every value about the mean fires the same rules', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 1, maxLength: 15 }),
        (z) => {
          const rules = (values: number[]): string[] =>
            controlRulesAt(values, values.length - 1).map((f) => f.rule);
          expect(rules(z.map((v) => -v + 0))).toEqual(rules(z));
        },
      ),
      { seed: 7, numRuns: 300 },
    );
  });

  it('fires nothing for a value on the mean after a calm series, and nothing for NaN', () => {
    expect(controlRulesAt([0.4, -0.3, 0.2, 0], 3)).toEqual([]);
    expect(controlRulesAt([Number.NaN], 0)).toEqual([]);
  });
});
