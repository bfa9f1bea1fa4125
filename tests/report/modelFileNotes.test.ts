import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/engine/demo';
import { readModelFile } from '../../src/io/export/readModelFile';
import { loadDemo } from '../../src/worker/dataOps';
import { fitModel } from '../../src/worker/modelOps';
import { modelFileText } from '../../src/worker/reportOps';
import { createSession } from '../../src/worker/session';

describe('committee notes in the model file', () => {
  it('saves purpose, setting, population and the free notes, and reads them back', async () => {
    const s = createSession();
    loadDemo(s, 'ssi');
    await fitModel(s, { spec: generateDemo('ssi').spec, method: 'ml', level: 0.95, alpha: 0.5, profile: false }, {});
    const text = {
      purpose: 'Audit of wound infections',
      setting: 'Two surgical wards',
      population: 'Adults after elective surgery',
      notes: 'Reviewed by the committee on 2 December; \u03b2 and \u2264 kept.',
    };
    const json = modelFileText(s, { missedCase: 10, falseAlarm: 1 }, 0.1, '2026-01-01T00:00:00Z', text);
    expect(readModelFile(json).notes).toEqual(text);
  });

  it('still reads a file without the notes field, and one without free notes', async () => {
    const s = createSession();
    loadDemo(s, 'ssi');
    await fitModel(s, { spec: generateDemo('ssi').spec, method: 'ml', level: 0.95, alpha: 0.5, profile: false }, {});
    const full = JSON.parse(modelFileText(s, { missedCase: 10, falseAlarm: 1 }, 0.1, '2026-01-01T00:00:00Z', {}));
    delete full.notes;
    expect(readModelFile(JSON.stringify(full)).notes).toEqual({});
    full.notes = { purpose: 'Older file' };
    expect(readModelFile(JSON.stringify(full)).notes).toEqual({ purpose: 'Older file' });
  });
});
