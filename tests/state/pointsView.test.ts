import { describe, expect, it } from 'vitest';
import type { Workspace } from '../../src/io/export/workspaceFile';
import { checkWorkspace } from '../../src/state/workspaceCheck';

describe('the points view in a saved workspace', () => {
  it('is a view a workspace may be saved on (the autosave keeps the view shown)', () => {
    const ws: Workspace = {
      fileName: null,
      data: null,
      spec: null,
      fitOptions: {},
      seed: null,
      threshold: null,
      costs: null,
      freeText: {},
      extra: { workbench: { roles: {}, interactions: [], costs: { missedCase: 5, falseAlarm: 1 }, view: 'points' } },
    };
    expect(checkWorkspace(ws).workbench).toMatchObject({ view: 'points' });
  });
});
