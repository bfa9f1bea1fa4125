import { describe, expect, it } from 'vitest';
import { costsText, cutoffRuleText } from '../../src/report/cutoffRule';

const costs = { missedCase: 5, falseAlarm: 1 };
const base = { threshold: 1 / 6, costs, costBased: 1 / 6, cheapest: 0.12 };

describe('how the cut-off was chosen, in the PDF’s words', () => {
  it('names the cost-based rule with its arithmetic', () => {
    expect(cutoffRuleText({ ...base, how: 'cost-based' })).toMatch(/^cost-based: 1\/\(1 \+ 5\) = 16\.7%, /);
    const twoToTen = { missedCase: 10, falseAlarm: 2 };
    expect(cutoffRuleText({ ...base, how: 'cost-based', costs: twoToTen })).toMatch(/^cost-based: 2\/\(2 \+ 10\) = /);
  });

  it('names the cheapest observed cut-off and a cut-off set by hand', () => {
    expect(cutoffRuleText({ ...base, threshold: 0.12, how: 'cheapest' })).toBe(
      'cheapest observed cut-off: 12.0% gave the lowest expected cost on these data',
    );
    expect(cutoffRuleText({ ...base, threshold: 0.12, how: 'hand' })).toBe('set by hand on the page at 12.0%');
  });

  it('does not repeat a claim the numbers do not bear out', () => {
    expect(cutoffRuleText({ ...base, threshold: 0.2, how: 'cost-based' })).toBe('set by hand on the page at 20.0%');
    expect(cutoffRuleText({ ...base, threshold: 0.2, how: 'cheapest' })).toBe('set by hand on the page at 20.0%');
    expect(cutoffRuleText({ ...base, threshold: 0.12, cheapest: null, how: 'cheapest' })).toMatch(/^set by hand/);
  });

  it('names a restored cut-off by the rule it matches, else says it was restored', () => {
    expect(cutoffRuleText({ ...base, how: 'restored' })).toMatch(/^cost-based: /);
    expect(cutoffRuleText({ ...base, threshold: 0.12, how: 'restored' })).toMatch(/^cheapest observed/);
    expect(cutoffRuleText({ ...base, threshold: 0.3, how: 'restored' })).toBe(
      'restored from a saved workspace at 30.0%',
    );
  });
});

describe('the costs in words', () => {
  it('says when the costs are the default nobody set', () => {
    expect(costsText({ missedCase: 10, falseAlarm: 1 }, false)).toBe(
      'the default 10 : 1, not set by the user (missed event (false negative) 10; false alarm (false positive) 1)',
    );
    expect(costsText({ missedCase: 10, falseAlarm: 1 }, true)).toBe(
      'missed event (false negative) 10; false alarm (false positive) 1; ratio 10 : 1',
    );
  });
});
