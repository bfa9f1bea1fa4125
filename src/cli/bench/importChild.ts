/**
 * Child process of `npm run bench`: imports one CSV file through src/io importFile (the worker's import) in a
 * fresh process, as the engine worker is a fresh context, and prints one JSON line. The file is read into memory
 * before the timer, as the page hands the worker the file's bytes. Argument: the CSV path.
 */
import { readFileSync } from 'node:fs';
import { importFile } from '../../io';

async function main(): Promise<void> {
  const bytes = new Uint8Array(readFileSync(process.argv[2]));
  const c0 = process.cpuUsage(),
    t0 = process.hrtime.bigint();
  const r = await importFile(bytes, 'bench.csv');
  const seconds = Number(process.hrtime.bigint() - t0) / 1e9,
    c = process.cpuUsage(c0);
  process.stdout.write(
    JSON.stringify({
      bytes: bytes.byteLength,
      seconds,
      cpuSeconds: (c.user + c.system) / 1e6,
      nRows: r.dataset.nRows,
      columns: r.dataset.columns.length,
    }) + '\n',
  );
}

void main();
