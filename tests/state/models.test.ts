import { describe, expect, it } from 'vitest';
import { resolveRequest } from '../../src/engine/workflow';
import { FieldChecker } from '../../src/io/export/validate';
import * as A from '../../src/state/actions';
import { initialState, type AppState } from '../../src/state/appState';
import * as M from '../../src/state/modelsState';
import { settingsOf } from '../../src/state/workspace';
import { checkWorkbench } from '../../src/state/workspaceCheck';
import type { FitRequest, FitView } from '../../src/worker/protocol';

const request = (columns: string[], extra: Partial<FitRequest> = {}): FitRequest =>
  resolveRequest({
    spec: { outcome: 'ssi', event: 'yes', terms: columns.map((column) => ({ type: 'main', column })) },
    ...extra,
  });

/** A fit view as the worker returns it, with only what the kept-model actions read. */
const view = (req: FitRequest, modelKey: number | undefined): FitView =>
  ({ request: req, modelKey, warnings: [], rowsUsed: 100, fit: { deviance: 1 } }) as unknown as FitView;

const fitted = (s: AppState, req: FitRequest, key: number) => A.fitDone(s, view(req, key));

describe('kept models: every fit kept by its request, named, shown again, saved in the workspace', () => {
  it('keeps each new fit with an automatic name and gives a refit of the same request to the same model', () => {
    let s = fitted(initialState, request(['age', 'asa']), 11);
    s = fitted(s, request(['age']), 12);
    expect(s.models.kept.map((k) => k.name)).toEqual(['Model 1: age, asa', 'Model 2: age']);
    expect(s.models.shown).toBe(2);
    s = fitted(s, request(['age', 'asa']), 13); // shown again or refitted: the same model, its new key
    expect(s.models.kept).toHaveLength(2);
    expect(s.models.shown).toBe(1);
    expect(s.models.kept[0].view?.modelKey).toBe(13);
    // A fit the worker did not keep (no key) adds nothing.
    expect(A.fitDone(s, view(request(['sex']), undefined)).models).toBe(s.models);
  });

  it('names the method and the rows left out, and shortens a long list of terms', () => {
    const long = ['age', 'bmi', 'diabetes', 'asa_class', 'wound_class', 'duration_min', 'prophylaxis', 'smoker'];
    expect(M.autoName(4, request(long))).toBe('Model 4: age, bmi, diabetes, asa_class, wound_class, duration_min, …');
    expect(M.autoName(3, request(['age'], { leaveOut: [5] }))).toBe('Model 3: age, 1 row left out');
    expect(M.autoName(2, request(['age'], { method: 'firth', leaveOut: [5, 9] }))).toBe(
      'Model 2: age (firth), 2 rows left out',
    );
  });

  it('renames (an empty name brings the automatic one back) and removes, clearing picks of a removed model', () => {
    let s = fitted(fitted(initialState, request(['age', 'asa']), 1), request(['age']), 2);
    s = M.renameModel(s, { id: 2, name: '  Age only ' });
    expect(s.models.kept[1]).toMatchObject({ name: 'Age only', named: true });
    s = M.renameModel(s, { id: 2, name: '' });
    expect(s.models.kept[1]).toMatchObject({ name: 'Model 2: age', named: false });
    s = M.pickForComparison(s, { slot: 'a', id: 1 });
    s = M.pickForComparison(s, { slot: 'b', id: 2 });
    s = M.removeModel(s, 1);
    expect(s.models.kept.map((k) => k.id)).toEqual([2]);
    expect(s.models.pick).toEqual({ a: null, b: 2 });
  });

  it(`keeps at most ${M.MAX_KEPT_MODELS} models, dropping the oldest`, () => {
    let s = initialState;
    for (let i = 0; i < M.MAX_KEPT_MODELS + 2; i++) s = fitted(s, request([`x${i}`]), 100 + i);
    expect(s.models.kept).toHaveLength(M.MAX_KEPT_MODELS);
    expect(s.models.kept[0].id).toBe(3);
  });

  it('showing a model sets the roles, method and level that ask for it', () => {
    let s: AppState = {
      ...initialState,
      roles: {
        age: { include: true, reference: null, knots: 0 },
        asa: { include: true, reference: 'II', knots: 0 },
        bmi: { include: false, reference: null, knots: 4 },
      },
    };
    s = fitted(
      s,
      resolveRequest({
        ...request([]),
        spec: {
          outcome: 'ssi',
          event: 'yes',
          terms: [
            { type: 'spline', column: 'bmi', knots: 4 },
            { type: 'main', column: 'asa', reference: 'III' },
          ],
        },
        method: 'firth',
        level: 0.9,
      }),
      1,
    );
    s = M.modelChosen(s, 1);
    expect(s.roles).toEqual({
      age: { include: false, reference: null, knots: 0 },
      asa: { include: true, reference: 'III', knots: 0 },
      bmi: { include: true, reference: null, knots: 4 },
    });
    expect(s.method).toBe('firth');
    expect(s.level).toBe(0.9);
  });

  it('saves each model by name and request in the workspace, checks them, restores them unfitted', () => {
    let s = fitted(fitted(initialState, request(['age', 'asa']), 1), request(['age']), 2);
    s = M.renameModel(s, { id: 2, name: 'Age only' });
    const saved = JSON.parse(JSON.stringify(settingsOf(s)));
    expect(saved.keptModels.map((k: M.SavedModel) => k.name)).toEqual(['Model 1: age, asa', 'Age only']);
    const checker = () => new FieldChecker('workspace-file-invalid', 'workspace');
    const back = checkWorkbench(checker(), saved, 'workbench');
    const restored = M.restoredModels(back.keptModels);
    expect(restored.kept.map((k) => [k.name, k.named, k.view])).toEqual([
      ['Model 1: age, asa', false, null],
      ['Age only', true, null],
    ]);
    expect(restored.pick).toEqual({ a: 1, b: 2 });
    // The restored models' fits arrive by request and find their model.
    const again = A.fitDone({ ...initialState, models: restored }, view(back.keptModels![1].request, 7));
    expect(again.models.kept[1].view?.modelKey).toBe(7);
    expect(again.models.shown).toBe(2);
    const bad = {
      ...saved,
      keptModels: [{ ...saved.keptModels[0], request: { ...saved.keptModels[0].request, level: 2 } }],
    };
    expect(() => checkWorkbench(checker(), bad, 'workbench')).toThrow(/keptModels\[0\]\.request\.level/);
  });

  it('gives a restored model that is not shown its fit without showing it (the views keep their numbers)', () => {
    let s = fitted(fitted(initialState, request(['age', 'asa']), 1), request(['age']), 2);
    const restored = M.restoredModels(JSON.parse(JSON.stringify(settingsOf(s))).keptModels);
    // the shown model (Model 2) is refitted first, as a restore does
    s = A.fitDone({ ...initialState, models: restored }, view(request(['age']), 5));
    const shownFit = s.fit;
    const quiet = M.keptModelFitted(s, view(request(['age', 'asa']), 6));
    expect(quiet.fit).toBe(shownFit);
    expect(quiet.models.shown).toBe(2);
    expect(quiet.models.kept.map((k) => k.view?.modelKey)).toEqual([6, 5]);
  });
});

describe('savedModels', () => {
  it('gives the same array for the same list (the autosave compares by reference) and a new one after a change', () => {
    const s = fitted(initialState, request(['age']), 1);
    expect(M.savedModels(s.models)).toBe(M.savedModels(s.models));
    expect(settingsOf(s).keptModels).toBe(settingsOf(s).keptModels);
    const renamed = M.renameModel(s, { id: 1, name: 'Age' });
    expect(M.savedModels(renamed.models)).not.toBe(M.savedModels(s.models));
  });
});
