import { expect, shot, test } from './guard';

// A spreadsheet whose header and cells carry HTML/script text must show that text literally and run nothing
// (OWASP XSS guidance, common practice). The guard also fails on any request (an <img src=x> rendered as HTML
// would request /x) and on any console error.
const ATTACK_IMG = '<img src=x onerror="window.__pwned=1">';
const ATTACK_SCRIPT = '<script>window.__pwned=2</script>';
const csv = [
  `outcome,"${ATTACK_IMG.replace(/"/g, '""')}",note`,
  ...Array.from({ length: 40 }, (_, i) => {
    const note = i === 0 ? ATTACK_SCRIPT : i === 1 ? ATTACK_IMG.replace(/"/g, '""') : `case ${i}`;
    return `${i % 3 === 0 ? 'yes' : 'no'},${(i * 7) % 13},"${note}"`;
  }),
].join('\n');

test('HTML and script text in a header or a cell is shown as text and never runs', async ({ page }) => {
  const dialogs: string[] = [];
  page.on('dialog', (d) => {
    dialogs.push(d.message());
    void d.dismiss();
  });
  await page.goto('/');
  await page
    .getByTestId('file-input')
    .setInputFiles({ name: 'hostile.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await expect(page.getByTestId('source')).toContainText('hostile.csv');
  await expect(page.getByText(ATTACK_IMG, { exact: true }).filter({ visible: true }).first()).toBeVisible();
  await expect(page.getByText(ATTACK_SCRIPT, { exact: true }).filter({ visible: true }).first()).toBeVisible();
  await shot(page, '40-hostile-text');
  expect(await page.evaluate(() => (window as unknown as { __pwned?: number }).__pwned)).toBeUndefined();
  expect(await page.locator('img[src="x"]').count()).toBe(0);
  expect(await page.locator('#root script').count()).toBe(0);
  expect(dialogs).toEqual([]);
});
