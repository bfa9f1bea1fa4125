// The layer rule: imports point one way only, ui → state → bridge → worker → report → engine/io.
// A file may import from its own layer or any layer below it, never from one above; code outside src/engine
// reaches the engine only through a folder's index (src/engine/<folder>), never a file inside it.
import { dirname, relative, resolve, sep } from 'node:path';

/** Layers from the bottom up; a layer may import from any layer at a lower or equal rank. */
export const LAYERS = [
  ['engine', 0],
  ['io', 1],
  ['report', 2],
  ['worker', 3],
  ['cli', 3],
  ['bridge', 4],
  ['state', 5],
  ['ui', 6],
  ['main.tsx', 6],
];
const RANK = new Map(LAYERS);

function layerOf(abs, srcRoot) {
  const rel = relative(srcRoot, abs);
  if (rel.startsWith('..')) return null;
  return rel.split(sep)[0];
}

/** @type {import('eslint').Rule.RuleModule} */
export const layersRule = {
  meta: {
    type: 'problem',
    docs: { description: 'Imports point down the layers (see DEVELOPERS.md, "Layers").' },
    schema: [],
    messages: {
      upward:
        '"{{from}}" may not import from "{{to}}": ' +
        'layers point one way, ui → state → bridge → worker → report → engine/io.',
      cliImport: 'Nothing but the command line imports from src/cli.',
      deepEngine: 'Import the engine through its folder index ("{{index}}"), not "{{spec}}".',
    },
  },
  create(context) {
    const file = context.filename;
    const srcRoot = resolve(context.cwd, 'src');
    const from = layerOf(file, srcRoot);
    const check = (node) => {
      const spec = node.source && node.source.value;
      if (typeof spec !== 'string' || !spec.startsWith('.')) return;
      const target = resolve(dirname(file), spec.replace(/\?.*$/, ''));
      const to = layerOf(target, srcRoot);
      if (!to || !RANK.has(to)) return;
      if (from === null) return; // tests and configs may reach any layer
      if (to === 'cli' && from !== 'cli') {
        context.report({ node: node.source, messageId: 'cliImport' });
        return;
      }
      if (RANK.has(from) && RANK.get(to) > RANK.get(from) && from !== to) {
        context.report({ node: node.source, messageId: 'upward', data: { from, to } });
        return;
      }
      if (to === 'engine' && from !== 'engine') {
        const parts = relative(resolve(srcRoot, 'engine'), target).split(sep);
        if (parts.length > 1 && parts[1] !== 'index' && parts[1] !== 'index.ts') {
          const index = relative(dirname(file), resolve(srcRoot, 'engine', parts[0]));
          context.report({ node: node.source, messageId: 'deepEngine', data: { spec, index } });
        }
      }
    };
    return {
      ImportDeclaration: check,
      ExportNamedDeclaration: check,
      ExportAllDeclaration: check,
      ImportExpression: check,
    };
  },
};

export default { rules: { layers: layersRule } };
