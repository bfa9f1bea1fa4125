import { execFileSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildModelReport } from '../../src/report/buildModelReport';
import { formatOr } from '../../src/report/format';
import { GLOSSARY, GLOSSARY_TERMS, glossaryEntry } from '../../src/report/glossary';
import type { ReportInput } from '../../src/report/reportInput';
import { birthwtReportInput } from './birthwtRecord';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-glossary-'));

function pdfText(input: ReportInput, name: string): string {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, buildModelReport(input));
  return execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' });
}

/** All source files of the page (src/ui, recursively). */
function uiSources(root = 'src/ui'): { path: string; text: string }[] {
  return readdirSync(root, { withFileTypes: true }).flatMap((e) => {
    const p = join(root, e.name);
    if (e.isDirectory()) return uiSources(p);
    return /\.tsx?$/.test(e.name) ? [{ path: p, text: readFileSync(p, 'utf8') }] : [];
  });
}

/** Glossary terms the page names: <Explain term="x" />, <ExplainList terms={['x', …]} />, and term maps. */
function termsUsedByUi(): Set<string> {
  const used = new Set<string>();
  for (const { text } of uiSources()) {
    for (const m of text.matchAll(/term="(\w+)"/g)) used.add(m[1]);
    for (const m of text.matchAll(/terms=\{\[([^\]]*)\]/g)) for (const q of m[1].matchAll(/'(\w+)'/g)) used.add(q[1]);
    for (const m of text.matchAll(/Record<string, GlossaryTerm> = \{([^}]*)\}/g))
      for (const q of m[1].matchAll(/:\s*'(\w+)'/g)) used.add(q[1]);
    // Terms handed to a helper that renders <Explain> (a quoted glossary key in a file that renders Explain).
    if (/<Explain /.test(text)) for (const q of text.matchAll(/'(\w+)'\)\}/g)) if (q[1] in GLOSSARY) used.add(q[1]);
  }
  return used;
}

const squash = (s: string) => s.replace(/\s+/g, ' ');

describe('the glossary of measures', () => {
  it('gives each term one plain line', () => {
    for (const t of GLOSSARY_TERMS) {
      const e = GLOSSARY[t];
      expect(e.text, t).not.toMatch(/\n/);
      expect(e.text.length, t).toBeLessThanOrEqual(240);
      expect(e.text, t).toMatch(/[.]$/);
    }
    expect(glossaryEntry('auc').text).toContain('0.5 is a coin toss, 1 is perfect');
    expect(() => glossaryEntry('no-such-measure')).toThrow();
  });

  it('every term the page uses exists, and the page explains the measures it shows', () => {
    const used = termsUsedByUi();
    for (const t of used) expect(GLOSSARY, `glossary lacks "${t}"`).toHaveProperty(t);
    const required = [
      'auc',
      'calibrationSlope',
      'calibrationInTheLarge',
      'ici',
      'brier',
      'scaledBrier',
      'netBenefit',
      'optimism',
      'profileLikelihood',
      'crossEntropy',
      'oddsRatio',
      'confidenceInterval',
      'likelihoodRatioTest',
      'eventsPerParameter',
      'sensitivity',
      'specificity',
      'ppv',
      'npv',
      'likelihoodRatios',
    ];
    for (const t of required) expect(used, `the page never explains "${t}"`).toContain(t);
  });
});

describe('the PDF', () => {
  let input: ReportInput;
  beforeAll(async () => {
    input = await birthwtReportInput();
  });

  it('ends with a glossary section holding every entry', () => {
    const text = squash(pdfText(input, 'glossary'));
    const at = text.search(/\d+\. Glossary/);
    expect(at).toBeGreaterThan(text.search(/\d+\. Cautions/));
    for (const t of GLOSSARY_TERMS) expect(text.slice(at), t).toContain(`${GLOSSARY[t].label}:`);
    expect(text.slice(at)).toContain(squash(GLOSSARY.auc.text));
  });

  it('shows odds ratios per the page’s unit, with the limits likewise, and a row per reference level', () => {
    const age = input.model.coefficients.find((c) => c.name === 'age')!;
    const plain = squash(pdfText(input, 'per-1'));
    expect(plain).not.toContain('age, per 10');
    expect(plain).toContain('race=1 (reference)');
    const text = squash(pdfText({ ...input, oddsUnits: { age: 10, race: 5 } }, 'per-10'));
    const or10 = formatOr(Math.exp(10 * age.estimate));
    const lo = formatOr(Math.exp(10 * (age.profileLower ?? age.waldLower!)));
    const hi = formatOr(Math.exp(10 * (age.profileUpper ?? age.waldUpper!)));
    expect(text).toContain(`age, per 10`);
    expect(text).toMatch(new RegExp(`age, per 10 \\S+ \\S+ ${or10.replace('.', '\\.')} ${lo} to ${hi}`));
    expect(Number(or10)).toBeCloseTo(Math.exp(10 * age.estimate), 2);
    // A unit for a categorical predictor is ignored; its reference row reads 1.
    expect(text).not.toContain('per 5');
    expect(text).toContain('race=1 (reference)');
    expect(text).toContain('\u2014 \u2014 1 \u2014 \u2014');
    // The coefficient itself stays per one unit.
    expect(text).toContain(`age, per 10 ${age.estimate.toFixed(4).replace('-', '\u2212')}`);
  });
});
