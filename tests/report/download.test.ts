import { describe, expect, it } from 'vitest';
import { suggestedFileName } from '../../src/ui/download';

describe('suggestedFileName', () => {
  it('builds "fulcra-<kind>-<outcome>-<date>.<ext>" with unsafe characters replaced', () => {
    const d = new Date('2026-12-02T01:00:00Z');
    expect(suggestedFileName('model-summary', 'SSI within 30 d', d)).toBe(
      'fulcra-model-summary-SSI_within_30_d-2026-12-02.pdf',
    );
    expect(suggestedFileName('pmml', 'a/b\\c:d', d)).toBe('fulcra-pmml-a_b_c_d-2026-12-02.pmml');
    expect(suggestedFileName('workspace', '', d)).toBe('fulcra-workspace-model-2026-12-02.fulcra-workspace.json');
  });
});

describe('FULCRA_VERSION', () => {
  it('is package.json\u2019s version', async () => {
    const { FULCRA_VERSION } = await import('../../src/report/version');
    const pkg = JSON.parse((await import('node:fs')).readFileSync('package.json', 'utf8'));
    expect(FULCRA_VERSION).toBe(pkg.version);
    expect(FULCRA_VERSION).toMatch(/^\d+\.\d+\.\d+/);
  });
});
