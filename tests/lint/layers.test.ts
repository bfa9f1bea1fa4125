import { ESLint } from 'eslint';
import { describe, expect, it } from 'vitest';

// The layer rule of lint/layers.js, run through ESLint with the project's own config (eslint.config.js), on code
// placed (virtually) at a path in src. `npm run lint` applies the same rule to every file.
const eslint = new ESLint({ cwd: process.cwd() });

async function layerMessages(filePath: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath });
  return result.messages.filter((m) => m.ruleId === 'fulcra/layers').map((m) => m.message);
}

describe('the layer rule (ui → state → bridge → worker/cli → report → io → engine)', () => {
  it('fails on an engine file that imports from the UI', async () => {
    const messages = await layerMessages(
      'src/engine/core/wrongWay.ts',
      "import { App } from '../../ui/App';\nvoid App;\n",
    );
    expect(messages).toHaveLength(1);
    expect(messages[0]).toMatch(/"engine" may not import from "ui"/);
  });

  it('fails on the worker reaching up into state, and on state reaching up into ui', async () => {
    expect(await layerMessages('src/worker/x.ts', "export { createStore } from '../state/store';\n")).toHaveLength(1);
    expect(
      await layerMessages('src/state/x.ts', "import type { Props } from '../ui/App';\nexport type P = Props;\n"),
    ).toHaveLength(1);
  });

  it('fails on io importing the report, and on anything but the command line importing src/cli', async () => {
    expect(await layerMessages('src/io/x.ts', "export * from '../report';\n")).toHaveLength(1);
    const cli = await layerMessages('src/worker/x.ts', "export { runFit } from '../cli/runFit';\n");
    expect(cli).toEqual(['Nothing but the command line imports from src/cli.']);
  });

  it('fails on code outside the engine importing a file inside an engine folder instead of its index', async () => {
    const messages = await layerMessages('src/worker/x.ts', "export { fit } from '../engine/fitting/fit';\n");
    expect(messages).toHaveLength(1);
    expect(messages[0]).toContain('"../engine/fitting"');
  });

  it('lets imports point down, and engine files import each other directly', async () => {
    expect(await layerMessages('src/ui/x.ts', "export type { Store } from '../state/store';\n")).toEqual([]);
    expect(await layerMessages('src/worker/x.ts', "export { fit } from '../engine/fitting';\n")).toEqual([]);
    expect(await layerMessages('src/engine/fitting/x.ts', "export { sigmoid } from '../numerics/loss';\n")).toEqual([]);
    expect(await layerMessages('src/report/x.ts', "export type { Dataset } from '../engine/core';\n")).toEqual([]);
  });
});
