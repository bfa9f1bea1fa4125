import { describe, expect, it } from 'vitest';
import { describePaste, summarisePaste } from '../../src/ui/pasteSummary';

describe('the summary that stands in for pasted cells', () => {
  it('counts lines (a final line break starts none), cells of the first line and UTF-8 bytes', () => {
    const text = 'age\tsex\tdied\r\n50\tF\tno\r\n61\tM\tyes\r\n';
    const s = summarisePaste(text);
    expect(s).toEqual({ bytes: text.length, lines: 3, columns: 3, names: ['age', 'sex', 'died'] });
    expect(describePaste(s)).toBe('33 bytes, 3 lines. First line: age, sex, died (3 cells)');
    expect(summarisePaste('a\nb').lines).toBe(2);
    expect(summarisePaste('a\rb\r').lines).toBe(2);
    expect(summarisePaste('').lines).toBe(0);
    // é is 2 bytes, € 3, 𝑥 (a surrogate pair) 4.
    expect(summarisePaste('é€𝑥').bytes).toBe(9);
  });

  it('shows the first six names, each cut to 24 characters, and says how many cells there are', () => {
    const header = ['a_very_long_column_name_indeed', ...'bcdefghijk'].join('\t');
    const s = summarisePaste(`${header}\n1\t2\n`);
    expect(s.columns).toBe(11);
    expect(s.names).toEqual(['a_very_long_column_name…', 'b', 'c', 'd', 'e', 'f']);
    expect(describePaste(s)).toBe(
      '55 bytes, 2 lines. First line: a_very_long_column_name…, b, c, d, e, f, … (11 cells)',
    );
  });

  it('splits on commas or semicolons when the first line has no tab', () => {
    expect(summarisePaste('x,y\n1,2').names).toEqual(['x', 'y']);
    expect(summarisePaste('x;y;z').columns).toBe(3);
    expect(summarisePaste('single').names).toEqual(['single']);
  });

  it('writes control characters as U+FFFD and says when the first line is empty', () => {
    expect(summarisePaste('a\u0000b\tc\n').names).toEqual(['a\ufffdb', 'c']);
    expect(describePaste(summarisePaste('\n1\t2\n'))).toBe('5 bytes, 2 lines. The first line is empty.');
  });

  it('gives the size in KB or MB beyond 1 KB', () => {
    const row = '1234567\t89\n';
    expect(describePaste(summarisePaste('x\ty\n' + row.repeat(100)))).toMatch(/^1 KB, 101 lines/);
    expect(describePaste(summarisePaste('x\ty\n' + row.repeat(600_000)))).toMatch(/^6 MB, 600,001 lines/);
  });
});
