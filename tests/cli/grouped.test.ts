import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../src/cli/args';
import { summarise } from '../../src/cli/summary';

// Reference: tests/fixtures/reference/grouped-glm.json (grouped-glm.R) — R 4.2.2 glm(cbind(events, non-events) ~ …,
// binomial) on MASS::menarche and datasets::esoph.
const ref = JSON.parse(readFileSync('tests/fixtures/reference/grouped-glm.json', 'utf8'));
const dir = mkdtempSync(join(tmpdir(), 'fulcra-grouped-'));

function csv(name: string, data: Record<string, (string | number)[]>): string {
  const cols = Object.keys(data);
  const n = data[cols[0]].length;
  const lines = [cols.join(',')];
  for (let i = 0; i < n; i++) lines.push(cols.map((c) => data[c][i]).join(','));
  const file = join(dir, name);
  writeFileSync(file, lines.join('\n') + '\n');
  return file;
}

describe('npm run fit with a table of counts', () => {
  it('--events --trials gives glm(cbind(Menarche, Total − Menarche) ~ Age) and says the layout (R 4.2.2)', async () => {
    const { runFit } = await import('../../src/cli/runFit');
    const file = csv('menarche.csv', ref.menarche.data);
    const argv = [file, '--events', 'Menarche', '--trials', 'Total', '--predictors', 'Age'];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    const coef = Object.values(ref.menarche.coefficients) as number[];
    run.fit.coefficients.forEach((c, j) =>
      expect(Math.abs(c.estimate - coef[j]) / Math.abs(coef[j])).toBeLessThan(1e-7),
    );
    expect(run.layout!.kind).toBe('events-trials');
    expect(run.layout!.cases).toBe(ref.menarche.cases);
    expect(run.request.spec.layout).toEqual({ kind: 'events-trials', trials: 'Total' });
    const text = summarise(run);
    expect(text).toMatch(/Cases used: 3,918 from 25 of 25 rows/);
    expect(text).toMatch(/Deviance conventions: per case .* grouped 26\.70\d* on 23 df/);
  });

  it('--events --nonevents on esoph gives R grouped deviance (R 4.2.2)', async () => {
    const { runFit } = await import('../../src/cli/runFit');
    const file = csv('esoph.csv', ref.esoph.data);
    const argv = [file, '--events', 'ncases', '--nonevents', 'ncontrols', '--predictors', 'agegp,tobgp,alcgp'];
    const run = await runFit(parseFitArgs(argv), argv, 'test');
    expect(run.layout!.deviance!.grouped).toBeCloseTo(ref.esoph.groupedDeviance, 6);
    expect(run.fit.nUsed).toBe(ref.esoph.cases);
  });

  it('refuses unclear layouts, naming the flags', () => {
    expect(() => parseFitArgs(['t.csv', '--events', 'e'])).toThrow(/--events COL needs one of --trials COL/);
    expect(() => parseFitArgs(['t.csv', '--events', 'e', '--trials', 'n', '--nonevents', 'm'])).toThrow(
      /needs one of --trials COL/,
    );
    expect(() => parseFitArgs(['t.csv', '--outcome', 'y', '--trials', 'n'])).toThrow(/--trials needs --events COL/);
    expect(() => parseFitArgs(['t.csv', '--outcome', 'y', '--events', 'e', '--trials', 'n'])).toThrow(
      /give only --events/,
    );
    expect(parseFitArgs(['t.csv', '--events', 'e', '--trials', 'n', '--weights', 'w'])).toMatchObject({
      outcome: 'e',
      trials: 'n',
      weights: 'w',
    });
  });
});
