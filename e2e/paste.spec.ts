import type { Page } from '@playwright/test';
import { expect, shot, test } from './guard';

const BOX = /Or paste cells copied from a spreadsheet/;

/** Puts text on the clipboard, focuses the paste box and presses Ctrl+V (⌘V on a Mac): a real paste. */
async function pasteFromClipboard(page: Page, text: string | null) {
  if (text !== null) await page.evaluate((t) => navigator.clipboard.writeText(t), text);
  await page.getByLabel(BOX).focus();
  await page.keyboard.press('ControlOrMeta+V');
}

/** A paste event carrying `text`, as the browser sends it (for text the system clipboard might not keep as is). */
async function dispatchPaste(page: Page, text: string) {
  await page.getByLabel(BOX).evaluate((box, t) => {
    const data = new DataTransfer();
    data.setData('text/plain', t);
    box.dispatchEvent(new ClipboardEvent('paste', { clipboardData: data, bubbles: true, cancelable: true }));
  }, text);
}

/** How much text the page shows: all of its text, the longest text box's value, and row ids of the pasted cells. */
function shownText(page: Page) {
  return page.evaluate(() => ({
    bodyText: document.body.innerText.length,
    longestBox: Math.max(
      0,
      ...[...document.querySelectorAll('textarea, input')].map((e) => (e as HTMLInputElement).value.length),
    ),
    rowIds: (document.body.innerHTML.match(/P\d{6}/g) ?? []).length,
  }));
}

test.beforeEach(async ({ context }) => {
  await context.grantPermissions(['clipboard-read', 'clipboard-write']);
});

test('100,000 × 11 pasted cells (6 MB) go to the engine without being shown, and no task blocks the page', async ({
  page,
}) => {
  await page.goto('/');
  // The cells are made in the page and put on the clipboard before the main thread's long tasks are watched.
  const chars = await page.evaluate(async () => {
    const lines = ['id\tage\tsex\tward\tbmi\tasa\tsmoker\tdiabetes\tadmitted\twound\tinfected'];
    const wounds = ['clean', 'clean-contaminated', 'contaminated', 'dirty'];
    for (let i = 0; i < 100_000; i++) {
      const day = `2024-${String(1 + (i % 12)).padStart(2, '0')}-${String(1 + (i % 28)).padStart(2, '0')}`;
      const bmi = (18 + (i % 200) / 10).toFixed(2);
      lines.push(
        [`P${String(i + 1).padStart(6, '0')}`, 20 + (i % 70), i % 2 ? 'female' : 'male', `Ward ${'ABCD'[i % 4]}`, bmi]
          .concat([1 + (i % 4), i % 3 ? 'no' : 'yes', i % 5 ? 'no' : 'yes', day, wounds[i % 4], i % 9 ? 'no' : 'yes'])
          .join('\t'),
      );
    }
    const text = `${lines.join('\r\n')}\r\n`;
    await navigator.clipboard.writeText(text);
    return text.length;
  });
  expect(chars).toBeGreaterThan(6_000_000);
  await page.evaluate(() => {
    const w = window as unknown as { longTasks: number[] };
    const from = performance.now();
    w.longTasks = [];
    new PerformanceObserver((list) => {
      for (const e of list.getEntries()) if (e.startTime >= from) w.longTasks.push(Math.round(e.duration));
    }).observe({ type: 'longtask' });
  });

  await pasteFromClipboard(page, null);
  const summary = page.getByTestId('paste-summary');
  await expect(summary).toHaveText(
    'Pasted: 6 MB, 100,001 lines. First line: id, age, sex, ward, bmi, asa, … (11 cells)',
  );
  // Held, not shown: the box stays empty and the page's text stays small.
  await expect(page.getByLabel(BOX)).toHaveValue('');
  expect(await shownText(page)).toEqual({ bodyText: expect.any(Number), longestBox: 0, rowIds: 0 });
  expect((await shownText(page)).bodyText).toBeLessThan(5_000);
  await shot(page, 'paste-held');

  await page.getByRole('button', { name: 'Use pasted cells' }).click();
  await expect(page.getByRole('heading', { name: /100,000 rows × 11 columns from pasted cells/ })).toBeVisible({
    timeout: 60_000,
  });
  await expect(page.getByRole('heading', { name: /100,000 rows/ })).toBeFocused();
  // The last pasted line is spreadsheet row 100,001 (the header is row 1), fetched when the grid scrolls to it.
  const grid = page.getByRole('grid', { name: 'Data rows' });
  await grid.evaluate((el) => {
    el.scrollTop = el.scrollHeight;
  });
  await expect(grid.getByRole('rowheader', { name: '100,001' })).toBeVisible({ timeout: 10_000 });
  await expect(grid.getByRole('row').last()).toContainText('P100000');
  await shot(page, 'paste-loaded');

  // Only the grid's visible window of rows is in the page, never the pasted text.
  const loaded = await shownText(page);
  expect(loaded.bodyText).toBeLessThan(20_000);
  expect(loaded.longestBox).toBeLessThan(100);
  expect(loaded.rowIds).toBeLessThan(200);

  await page.waitForTimeout(500); // lets the observer deliver the last long tasks
  // A guard against the text being rendered (6 MB in a text box held the page for 16 s), not a speed
  // benchmark: the bound is generous; `npm run bench` is where speed is measured.
  const tasks = await page.evaluate(() => (window as unknown as { longTasks: number[] }).longTasks);
  console.log(`long main-thread tasks during the 6 MB paste and load (ms): ${JSON.stringify(tasks)}`);
  expect(Math.max(0, ...tasks)).toBeLessThan(1000);
});

test('a paste goes in at the caret of typed cells, replaces a held paste, and Clear gives the box back', async ({
  page,
}) => {
  await page.goto('/');
  const box = page.getByLabel(BOX);
  await expect(box).toHaveAccessibleDescription(/press Ctrl\+V \(⌘V on a Mac\)/);
  await box.fill('dose,response\n');
  await pasteFromClipboard(page, '1,no\n2,yes\n');
  await expect(page.getByTestId('paste-summary')).toHaveText(
    'Pasted: 25 bytes, 3 lines. First line: dose, response (2 cells)',
  );
  await expect(box).toHaveValue('');
  await expect(box).toHaveJSProperty('readOnly', true);

  // Another paste replaces the held cells whole; Clear drops them and gives the box back for typing.
  const rows = ['dose\tresponse', ...Array.from({ length: 8 }, (_, i) => `${i + 1}\t${i % 3 ? 'no' : 'yes'}`)];
  await pasteFromClipboard(page, rows.join('\n'));
  await expect(page.getByTestId('paste-summary')).toHaveText(
    'Pasted: 56 bytes, 9 lines. First line: dose, response (2 cells)',
  );
  await page.getByRole('button', { name: 'Clear' }).click();
  await expect(box).toBeFocused();
  await expect(box).toHaveJSProperty('readOnly', false);
  await expect(page.getByTestId('paste-summary')).toHaveText('');
  await expect(page.getByRole('button', { name: 'Use pasted cells' })).toBeDisabled();
  await page.keyboard.type('x,y\n1,yes\n2,no\n3,no\n');
  await expect(box).toHaveValue('x,y\n1,yes\n2,no\n3,no\n');
  await page.getByRole('button', { name: 'Use pasted cells' }).click();
  await expect(page.getByRole('heading', { name: /3 rows × 2 columns from pasted cells/ })).toBeVisible();
});

test('pasted control characters get their own message naming the row and column', async ({ page }) => {
  await page.goto('/');
  await dispatchPaste(page, 'a\tb\n1\t\u00002\n3\t4\n');
  await expect(page.getByTestId('paste-summary')).toHaveText('Pasted: 13 bytes, 3 lines. First line: a, b (2 cells)');
  await page.getByRole('button', { name: 'Use pasted cells' }).click();
  const notice = page.getByRole('region', { name: 'Messages' }).getByRole('alert');
  await expect(notice).toContainText(
    'The pasted cells contain a control character (U+0000) in row 2, column 2, which a spreadsheet cell does not hold',
  );
  await shot(page, 'paste-control-character');
});

test('a clipboard without text says so', async ({ page }) => {
  await page.goto('/');
  await dispatchPaste(page, '');
  await expect(page.getByTestId('paste-summary')).toHaveText(/The clipboard holds no text/);
  await expect(page.getByRole('button', { name: 'Use pasted cells' })).toBeDisabled();
});
