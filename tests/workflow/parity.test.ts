import { execFile } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { basename } from 'node:path';
import { promisify } from 'node:util';
import { describe, expect, it } from 'vitest';
import type { ModelSpec, TermSpec } from '../../src/engine/core';
import type { AnalysisRecord, AnalysisRequestInput } from '../../src/engine/workflow';
import { toJson } from '../../src/cli/json';
import type { ImportOptions } from '../../src/io/types';
import { createApi } from '../../src/worker/api';

/**
 * One analysis, one record: each request runs through the worker api (as the page calls it) and through
 * `npm run fit --json` (a separate process), and the two AnalysisRecords must agree number for number after
 * the same JSON encoding (typed arrays become arrays). Only the CLI's `fulcra` and `data` blocks (version,
 * arguments, file names) are left out of the comparison.
 */

const run = promisify(execFile);
const DATA = 'tests/fixtures/data/';

interface Case {
  name: string;
  file: string;
  /** The same analysis as arguments of `npm run fit`. */
  argv: string[];
  /** …and as the page asks for it. */
  importOptions: ImportOptions;
  request: AnalysisRequestInput;
  bootstrap?: number;
  test?: string;
}

const main = (...columns: string[]): TermSpec[] => columns.map((column) => ({ type: 'main', column }));
const birthwt = (event: string, terms: TermSpec[]): ModelSpec => ({ outcome: 'low', event, terms });
const PREDICTORS = ['age', 'lwt', 'smoke', 'ptl', 'ht', 'ui'];

const CASES: Case[] = [
  {
    name: 'plain maximum likelihood',
    file: 'birthwt.csv',
    argv: ['--outcome', 'low', '--predictors', PREDICTORS.join(',')],
    importOptions: {},
    request: { spec: birthwt('1', main(...PREDICTORS)) },
  },
  {
    // The event is the majority class (130 of 189): events per parameter must count the 59 non-events.
    name: 'a categorical with a reference level, the event the majority class',
    file: 'birthwt.csv',
    argv: ['--outcome', 'low', '--event', '0', '--predictors', 'age,lwt,race,smoke,ptl,ht,ui'].concat([
      '--categorical',
      'race',
      '--reference',
      'race=2',
    ]),
    importOptions: { columnTypes: { race: 'categorical' } },
    request: {
      spec: birthwt('0', [
        ...main('age', 'lwt'),
        { type: 'main', column: 'race', reference: '2' },
        ...main(...PREDICTORS.slice(2)),
      ]),
    },
  },
  {
    name: 'Firth',
    file: 'endometrial.csv',
    argv: ['--outcome', 'HG', '--firth'],
    importOptions: {},
    request: { spec: { outcome: 'HG', event: '1', terms: main('NV', 'PI', 'EH') }, method: 'firth' },
  },
  {
    // Endometrial needs 7 Firth iterations: a limit of 4 stops it short on both paths alike.
    name: 'Firth with an iteration limit of 4',
    file: 'endometrial.csv',
    argv: ['--outcome', 'HG', '--firth', '--max-iter', '4'],
    importOptions: {},
    request: { spec: { outcome: 'HG', event: '1', terms: main('NV', 'PI', 'EH') }, method: 'firth', maxIter: 4 },
  },
  {
    name: 'lasso with λ by cross-validation',
    file: 'birthwt.csv',
    argv: ['--outcome', 'low', '--predictors', PREDICTORS.join(','), '--penalty', 'lasso'],
    importOptions: {},
    request: { spec: birthwt('1', main(...PREDICTORS)), method: 'lasso' },
  },
  {
    name: 'elastic net, α = 0.3, λ at the lowest CV deviance, 5 folds, seed 3',
    file: 'birthwt.csv',
    argv: ['--outcome', 'low', '--predictors', PREDICTORS.join(','), '--penalty', 'elastic-net'].concat([
      '--alpha',
      '0.3',
      '--lambda-rule',
      'cv-min',
      '--cv',
      '5',
      '--seed',
      '3',
    ]),
    importOptions: {},
    request: {
      spec: birthwt('1', main(...PREDICTORS)),
      method: 'elastic-net',
      alpha: 0.3,
      lambda: 'cv-min',
      folds: 5,
      seed: 3,
    },
  },
  {
    name: 'a seeded bootstrap',
    file: 'birthwt.csv',
    argv: ['--outcome', 'low', '--predictors', PREDICTORS.join(','), '--bootstrap', '25', '--seed', '7'],
    importOptions: {},
    request: { spec: birthwt('1', main(...PREDICTORS)), seed: 7 },
    bootstrap: 25,
  },
  {
    name: 'an external test file, with costs and a cut-off',
    file: 'validate-pima-tr.csv',
    argv: ['--outcome', 'type', '--event', 'Yes', '--costs', '4:1', '--threshold', '0.3'].concat([
      '--test',
      `${DATA}validate-pima-te.csv`,
    ]),
    importOptions: {},
    request: {
      spec: { outcome: 'type', event: 'Yes', terms: main('npreg', 'glu', 'bp', 'skin', 'bmi', 'ped', 'age') },
      costs: { missedCase: 4, falseAlarm: 1 },
      threshold: 0.3,
    },
    test: 'validate-pima-te.csv',
  },
];

const bytesOf = (file: string): ArrayBuffer => {
  const b = readFileSync(DATA + file);
  return b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer;
};

/** The record as the page gets it: import, fit, then (on button presses) bootstrap and external validation. */
async function throughWorker(c: Case): Promise<unknown> {
  const api = createApi();
  await api.importFile(bytesOf(c.file), c.file, c.importOptions, 'import');
  await api.fitModel(c.request, 'fit');
  if (c.bootstrap) await api.validate(c.bootstrap, 'validate');
  if (c.test) await api.externalValidate(bytesOf(c.test), c.test, 'external');
  return JSON.parse(toJson(await api.analysisRecord()));
}

/** The record `npm run fit --json` prints, without its `fulcra` and `data` blocks. */
async function throughCli(
  c: Case,
): Promise<{ record: unknown; data: { file: string; test: { file: string } | null } }> {
  const { stdout } = await run('npx', ['tsx', 'src/cli/fit.ts', DATA + c.file, ...c.argv, '--json'], {
    maxBuffer: 64 << 20,
  });
  const { fulcra: _fulcra, data, ...record } = JSON.parse(stdout);
  return { record, data };
}

describe('the page and npm run fit give one record', () => {
  it.each(CASES.map((c) => [c.name, c] as const))(
    '%s',
    async (_name, c) => {
      const [page, cli] = await Promise.all([throughWorker(c), throughCli(c)]);
      expect(cli.data.file).toBe(basename(c.file));
      expect(cli.data.test?.file ?? null).toBe(c.test ?? null);
      const record = page as AnalysisRecord;
      expect(Object.keys(record).sort()).toEqual(Object.keys(cli.record as object).sort());
      expect(record.fit.coefficients.length).toBeGreaterThan(1);
      expect(record.validation !== null).toBe(c.bootstrap !== undefined);
      expect(record.external !== null).toBe(c.test !== undefined);
      expect(page).toEqual(cli.record);
    },
    180_000,
  );

  it('carries the iteration limit to the Firth fit on both paths (4: stopped short, not converged)', async () => {
    const c = CASES.find((x) => x.name === 'Firth with an iteration limit of 4')!;
    const [page, cli] = await Promise.all([throughWorker(c), throughCli(c)]);
    for (const r of [page, cli.record] as AnalysisRecord[]) {
      expect(r.request.maxIter).toBe(4);
      expect([r.fit.converged, r.fit.iterations]).toEqual([false, 4]);
      expect(r.warnings.find((w) => w.code === 'not-converged')?.message).toMatch(/did not converge in 4 iterations/);
    }
  }, 180_000);

  it('counts events per parameter by the smaller class on both paths (59 non-events, 8 coefficients)', async () => {
    const c = CASES.find((x) => x.name.startsWith('a categorical with a reference level'))!;
    const [page, cli] = await Promise.all([throughWorker(c), throughCli(c)]);
    for (const r of [page, cli.record] as AnalysisRecord[]) {
      expect([r.fit.events, r.fit.nonEvents, r.fit.parameters]).toEqual([130, 59, 8]);
      expect(r.fit.eventsPerParameter).toBe(59 / 8);
      expect(r.sampleSize!.actual).toMatchObject({ n: 189, events: 59, eventsPerParameter: 59 / 8 });
      expect(r.sampleSize!.summary.at(-1)).toMatch(/Your data \(189 cases, 59 events, 7\.4 per parameter\)/);
      const low = r.warnings.find((w) => w.code === 'low-events-per-parameter');
      expect(low?.message).toMatch(/^7\.4 non-events per estimated coefficient/);
    }
  }, 180_000);
});
