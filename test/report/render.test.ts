// The report as a reader opens it: headless Chromium (Debian's, as the panel tests use) loads the file from disk
// in light and dark, and in print layout. It must render without a console error or a single request beyond the
// file itself, with the region map (its grid image decoded), the importance charts, the error curve and the
// evaluation pictures on screen.
// Screenshots go to the e2e artifacts folder (.artifacts/e2e/report-render) to be looked at.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { chromium, type Browser, type Page } from 'playwright-core';
import { artifactsDir, CHROMIUM_PATH } from '../e2e/harness/paths';

const root = path.join(__dirname, '..', '..', '..');

// Held-out rows and folds, so the evaluation pictures for both sources and the cross-validation column are drawn.
const FILES = [
  { name: 'kites', data: 'demo/kite-flights.csv', target: 'outcome', extra: ['--holdout', '0.2', '--folds', '3'], evaluation: 'roc' },
  { name: 'loaves', data: 'demo/loaf-rise.csv', target: 'rise_mm', extra: ['--folds', '3'], evaluation: 'predicted-actual' },
];

async function open(browser: Browser, file: string, scheme: 'light' | 'dark'): Promise<{ page: Page; problems: string[] }> {
  const page = await browser.newPage({ viewport: { width: 1100, height: 900 }, colorScheme: scheme });
  const problems: string[] = [];
  const url = `file://${file}`;
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') problems.push(`console ${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('request', (r) => {
    if (r.url() !== url && !r.url().startsWith('data:')) problems.push(`request: ${r.url()}`);
  });
  await page.goto(url);
  return { page, problems };
}

async function visible(page: Page, selector: string): Promise<void> {
  const box = await page.locator(selector).first().boundingBox();
  assert.ok(box && box.width > 100 && box.height > 60, `${selector} is not on screen (${JSON.stringify(box)})`);
}

describe('shareable report in a browser', function () {
  this.timeout(300000);
  let browser: Browser;
  const shots = artifactsDir('report-render');
  const written: Record<string, string> = {};

  before(async function () {
    if (!fs.existsSync(CHROMIUM_PATH)) throw new Error(`no Chromium at ${CHROMIUM_PATH}; run: bash scripts/e2e/setup.sh`);
    for (const f of FILES) {
      const out = path.join(shots, `${f.name}.html`);
      const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), 'fit', path.join(root, f.data), '--target', f.target, '--report', out, ...f.extra], { encoding: 'utf8' });
      assert.equal(r.status, 0, r.stderr);
      // The bound for the demo files; maps are grids and points a sample, so size does not grow with rows.
      assert.ok(fs.statSync(out).size < 2 * 1024 * 1024, `${f.name}: ${fs.statSync(out).size} bytes`);
      written[f.name] = out;
    }
    browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: ['--no-sandbox', '--disable-gpu'] });
  });

  after(async () => browser?.close());

  for (const f of FILES) {
    for (const scheme of ['light', 'dark'] as const) {
      it(`${f.name}: renders in ${scheme} with the map, importance and curve visible, and no error or request`, async () => {
        const { page, problems } = await open(browser, written[f.name], scheme);
        await visible(page, '[data-chart="region-map"] svg');
        await visible(page, '[data-chart="importance-impurity"] svg');
        await visible(page, '[data-chart="curve"] svg');
        await visible(page, `[data-chart="${f.evaluation}"] svg`);
        if (f.evaluation === 'roc') await visible(page, '[data-chart="calibration"] svg');
        // The grid is a PNG inside the SVG: it must decode, at one pixel per cell (the map's one numeric axis at least).
        // Browser-side code is a string: this file is compiled without the DOM library.
        const size = await page.evaluate<number[]>(`(async () => {
          const img = new Image();
          img.src = document.querySelector('[data-chart="region-map"] image').getAttribute('href');
          await img.decode();
          return [img.naturalWidth, img.naturalHeight];
        })()`);
        // 64 cells along a numeric axis, one per level along a level axis.
        assert.ok(size.every((n) => n === 64 || (n >= 2 && n < 64)) && size.includes(64), `grid image ${size.join(' x ')}`);
        // The page follows the reader's scheme: the body's background is light or dark accordingly.
        const bg = await page.evaluate<string>('getComputedStyle(document.body).backgroundColor');
        assert.equal(bg, scheme === 'light' ? 'rgb(255, 255, 255)' : 'rgb(30, 30, 30)');
        await page.screenshot({ path: path.join(shots, `${f.name}-${scheme}.png`), fullPage: true });
        await page.locator('#evaluation').screenshot({ path: path.join(shots, `${f.name}-evaluation-${scheme}.png`) });
        if (scheme === 'light') {
          await page.emulateMedia({ media: 'print' });
          // Print drops the cards' boxes for a rule above each section.
          assert.equal(await page.evaluate<string>(`getComputedStyle(document.querySelector('section')).borderLeftStyle`), 'none');
          await page.screenshot({ path: path.join(shots, `${f.name}-print.png`), fullPage: true });
          fs.writeFileSync(path.join(shots, `${f.name}.pdf`), await page.pdf({ format: 'A4', printBackground: true }));
        }
        assert.deepEqual(problems, []);
        await page.close();
      });
    }
  }
});
