import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { buildModelReport } from '../../src/report/buildModelReport';
import { CAUTIONS_BY_SETTING, cautionSettingOf, pageCaution } from '../../src/report/cautions';
import type { ReportInput } from '../../src/report/reportInput';
import { birthwtReportInput } from './birthwtRecord';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-cautions-'));

/** The text of the PDF's Cautions section (pdftotext), whitespace collapsed. */
function cautionsText(bytes: Uint8Array, name: string): string {
  const path = join(dir, `${name}.pdf`);
  writeFileSync(path, bytes);
  const text = execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
  // up to the TRIPOD+AI checklist page, which names the Cautions section
  const body = text.split(/\d+\. TRIPOD\+AI checklist/)[0];
  return body.slice(body.lastIndexOf('Cautions'));
}

let input: ReportInput;
beforeAll(async () => {
  input = await birthwtReportInput();
});

describe('the PDF cautions follow the setting', () => {
  it('prints the clinical cautions by default and for a clinical setting', () => {
    for (const [name, given] of [
      ['default', input],
      ['clinical', { ...input, cautionSetting: 'clinical' as const }],
    ] as const) {
      const t = cautionsText(buildModelReport(given), name);
      expect(t).toContain('not a medical device');
      expect(t).toContain('licensed clinical judgement');
      expect(t).not.toContain('quality system');
    }
  });

  it('prints the quality-system cautions for an industrial / quality setting, and no clinical words', () => {
    const t = cautionsText(buildModelReport({ ...input, cautionSetting: 'quality' }), 'quality');
    expect(t).toContain('not a validated measuring or control system');
    expect(t).toContain('Use follows your quality system and local procedures');
    expect(t).toContain('is not external validation');
    expect(t).not.toMatch(/medical device|clinical|patients|hospital/);
    for (const c of CAUTIONS_BY_SETTING.quality) expect(t).toContain(c.slice(0, 50));
  });
});

describe('the page caution', () => {
  it('speaks of the quality system for quality data and of clinical judgement otherwise', () => {
    expect(pageCaution('quality', false)).toMatch(/^Not a validated measuring or control system\./);
    expect(pageCaution('quality', false)).toContain("A model's internal validation is not external validation");
    expect(pageCaution('quality', true)).toContain('follow your quality system and local procedures');
    expect(pageCaution('clinical', false)).toMatch(/^Not a medical device\..*licensed clinical judgement\.$/);
  });

  it('reads anything but "quality" as the clinical default (old or hand-edited workspaces)', () => {
    expect(cautionSettingOf('quality')).toBe('quality');
    for (const v of [undefined, '', 'industrial', 3]) expect(cautionSettingOf(v)).toBe('clinical');
  });
});
