import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseFitArgs } from '../../src/cli/args';
import { buildSpec, loadTable } from '../../src/cli/runFit';
import { FulcraError } from '../../src/engine/core/data';
import { makeXlsx } from '../fixtures/bad-input/xlsxWriter';

describe('npm run fit on a workbook of several sheets', () => {
  it('names the sheet read and the other sheets when a column is missing', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'fulcra-sheets-'));
    const file = join(dir, 'audit.xlsx');
    writeFileSync(
      file,
      makeXlsx([
        { name: 'Notes', rows: [['note'], ['invented data']] },
        {
          name: 'Cases',
          rows: [
            ['age', 'ssi'],
            [34, 'yes'],
            [51, 'no'],
          ],
        },
        { name: 'Codes', rows: [['code'], ['A']] },
      ]),
    );
    const args = parseFitArgs([file, '--outcome', 'ssi']);
    const table = await loadTable(file, args);
    const e = (() => {
      try {
        buildSpec(args, table);
        return null;
      } catch (x) {
        return x as FulcraError;
      }
    })();
    expect(e).toBeInstanceOf(FulcraError);
    expect(e!.message).toContain('There is no column named "ssi" in sheet "Notes"');
    expect(e!.message).toContain('The workbook has 3 sheets: "Notes", "Cases", "Codes"');
    expect(e!.suggestion).toContain('--sheet');
  });
});
