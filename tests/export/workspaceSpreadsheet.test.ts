import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { readWorkspaceBytes } from '../../src/io/export/workspaceFile';

const bytes = (s: string): Uint8Array => new TextEncoder().encode(s);

describe('a spreadsheet given as a workspace file', () => {
  it('names a CSV file and points to "Open a spreadsheet" instead of a JSON parse error', async () => {
    const csv = readFileSync('tests/fixtures/data/birthwt.csv');
    await expect(readWorkspaceBytes(new Uint8Array(csv))).rejects.toMatchObject({
      code: 'workspace-file-spreadsheet',
      message: expect.stringMatching(/looks like a spreadsheet \(comma-separated text\).*use "Open a spreadsheet"/),
    });
  });

  it('recognises tab- and semicolon-separated text', async () => {
    await expect(readWorkspaceBytes(bytes('age\tsex\tdied\n4\tF\tyes\n7\tM\tno\n'))).rejects.toThrow(
      /tab-separated text/,
    );
    await expect(readWorkspaceBytes(bytes('age;sex\r\n4;F\r\n7;M\r\n'))).rejects.toThrow(/semicolon-separated/);
  });

  it('recognises an xlsx by its zip signature', async () => {
    const zip = new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0, 0, 0, 8, 0]);
    await expect(readWorkspaceBytes(zip)).rejects.toMatchObject({
      code: 'workspace-file-spreadsheet',
      message: expect.stringMatching(/\.xlsx file.*Open a spreadsheet/),
    });
  });

  it('still reports damaged JSON as a damaged workspace file', async () => {
    await expect(readWorkspaceBytes(bytes('{"fulcraWorkspace": 1,'))).rejects.toMatchObject({
      code: 'workspace-file-invalid',
    });
    await expect(readWorkspaceBytes(bytes('just some words'))).rejects.toMatchObject({
      code: 'workspace-file-invalid',
    });
  });
});
