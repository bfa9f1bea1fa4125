// `npm run fit -- FILE --outcome COL ...`: the headless command over the same io + engine as the page.
import { readFileSync } from 'node:fs';
import { FulcraError } from '../engine/core';
import { parseFitArgs, usage } from './args';
import { toJson } from './json';
import { createProgress } from './progress';
import { runFit } from './runFit';
import { summarise } from './summary';

const version = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')).version as string;

async function main(argv: string[]): Promise<number> {
  try {
    const args = parseFitArgs(argv);
    if (args.help) {
      process.stdout.write(usage);
      return 0;
    }
    const run = await runFit(
      args,
      argv,
      version,
      createProgress((line) => process.stderr.write(`${line}\n`)),
    );
    process.stdout.write((args.json ? toJson(run) : summarise(run)) + '\n');
    return 0;
  } catch (e) {
    if (e instanceof FulcraError) {
      process.stderr.write(`fulcra: ${e.message}${e.suggestion ? `\n  ${e.suggestion}` : ''}\n`);
      return 2;
    }
    throw e;
  }
}

process.exitCode = await main(process.argv.slice(2));
