// The shareable HTML report as the command line writes it: data strings render as text, nothing reaches outside
// the file, the same fit gives the same file apart from the date line, and the scores are the ones --json prints.
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { CAUTION, CSP, DATE_LINE } from '../../src/report/html';
import type { FitJson } from '../cli/output';

const root = path.join(__dirname, '..', '..', '..');
const kites = path.join(root, 'demo/kite-flights.csv');
const loaves = path.join(root, 'demo/loaf-rise.csv');

function copse(...args: string[]): { code: number; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8' });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

/** A small file whose column names, levels and classes are all markup. */
function markupCsv(file: string): void {
  const lines = ['"<img src=x onerror=alert(1)>",size,"a&b ""q""","<i>kind</i>"'];
  for (let i = 0; i < 160; i++) {
    const v = (i * 37) % 100;
    const level = ['<b>bold</b>', '<script>alert(2)</script>', 'plain'][i % 3];
    const cls = v > 50 !== (i % 11 === 0) ? '<u>yes</u>' : 'no & never';
    lines.push(`${v},${(i * 13) % 29},"${level}",${cls}`);
  }
  writeFileSync(file, lines.join('\n') + '\n');
}

/** Fits with --report and --json in one run; returns the report and the JSON. */
function fitWithReport(data: string, target: string, out: string, ...extra: string[]): { html: string; json: FitJson } {
  const r = copse('fit', data, '--target', target, '--trees', '30', '--seed', '5', '--report', out, '--json', ...extra);
  assert.equal(r.code, 0, r.stderr);
  return { html: readFileSync(out, 'utf8'), json: JSON.parse(r.stdout) as FitJson };
}

const headline = (html: string, which: 'oob' | 'test'): number => {
  const m = new RegExp(`data-score="${which}" data-value="([^"]+)"`).exec(html);
  assert.ok(m, `no ${which} score in the report`);
  return Number(m[1]);
};

describe('shareable report (copse fit --report)', function () {
  this.timeout(240000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-report-'));

  it('writes column names, levels and classes that are markup as text', () => {
    const csv = path.join(dir, 'markup.csv');
    markupCsv(csv);
    const { html } = fitWithReport(csv, '<i>kind</i>', path.join(dir, 'markup.html'));
    for (const raw of ['<img src=x', '<script>', '<b>bold', '<u>yes', '<i>kind']) assert.ok(!html.includes(raw), `raw markup ${raw} in the report`);
    for (const text of ['&lt;img src=x onerror=alert(1)&gt;', '&lt;script&gt;a', '&lt;u&gt;yes&lt;/u&gt;', 'a&amp;b &quot;q&quot;', 'no &amp; never']) {
      assert.ok(html.includes(text), `${text} missing`);
    }
    // The page's own elements are the only ones: a script element would mean some string escaped the escaping.
    assert.ok(!/<script/i.test(html));
    // Escaped text holds no "<", so every tag left is the report's own; none may carry an event handler.
    const tags = html.match(/<[a-z][^>]*>/gi) ?? [];
    // Quoted values are set aside first: a quote inside one is written &quot;, so a value cannot end early.
    assert.deepEqual(tags.filter((t) => /\son[a-z]+=/i.test(t.replace(/"[^"]*"/g, '""'))), []);
  });

  it('holds no network reference and a policy that allows only what the file holds', () => {
    const { html } = fitWithReport(kites, 'outcome', path.join(dir, 'kites.html'));
    assert.ok(!/https?:/i.test(html), 'an http: or https: reference');
    assert.ok(!/\b(src|href)="(?!data:)/.test(html), 'a src or href that is not inline data');
    assert.ok(!/url\(/.test(html), 'a CSS url()');
    assert.ok(html.includes(`<meta http-equiv="Content-Security-Policy" content="${CSP}">`));
    assert.match(CSP, /default-src 'none'/);
    assert.ok(html.includes('@media print'), 'no print stylesheet');
    assert.ok(html.includes('prefers-color-scheme: dark'), 'no dark scheme');
  });

  it('carries the caution, and the out-of-bag score that --json reports', () => {
    const { html, json } = fitWithReport(kites, 'outcome', path.join(dir, 'kites2.html'), '--holdout', '0.2');
    assert.equal(html.split(CAUTION).length - 1, 2, 'the caution at the top and at the end');
    assert.equal(headline(html, 'oob'), json.oob!.accuracy);
    assert.equal(headline(html, 'test'), json.test!.accuracy);
    for (const chart of ['curve', 'importance-impurity', 'importance-permutation', 'region-map', 'pair-map', 'dependence']) assert.ok(html.includes(`data-chart="${chart}"`), `no ${chart}`);
    assert.ok(html.includes(`data-suspects="${(json as unknown as { suspectCount: number }).suspectCount}"`), 'the doubtful-row count');
  });

  it('gives the same file for the same data, settings and seed, apart from the date line', () => {
    const a = fitWithReport(loaves, 'rise_mm', path.join(dir, 'a.html')).html;
    const b = fitWithReport(loaves, 'rise_mm', path.join(dir, 'b.html'), '--workers', '3').html;
    assert.equal(a.match(new RegExp(DATE_LINE.source, 'gm'))?.length, 1, 'one date line');
    assert.equal(a.replace(DATE_LINE, ''), b.replace(DATE_LINE, ''));
    // And it is not the same file whatever the input: another seed draws other trees.
    const c = copse('fit', loaves, '--target', 'rise_mm', '--trees', '30', '--seed', '6', '--report', path.join(dir, 'c.html'));
    assert.equal(c.code, 0, c.stderr);
    assert.notEqual(readFileSync(path.join(dir, 'c.html'), 'utf8').replace(DATE_LINE, ''), a.replace(DATE_LINE, ''));
  });

  it('shows the regression score that --json reports', () => {
    const { html, json } = fitWithReport(loaves, 'rise_mm', path.join(dir, 'loaf.html'));
    assert.equal(headline(html, 'oob'), json.oob!.r2);
    assert.ok(html.includes('Residuals (out-of-bag'));
  });

  it('refuses to write the report over the data file', () => {
    const csv = path.join(dir, 'keep.csv');
    markupCsv(csv);
    const before = readFileSync(csv, 'utf8');
    const r = copse('fit', csv, '--target', '<i>kind</i>', '--report', csv);
    assert.equal(r.code, 1);
    assert.match(r.stderr, /Refusing to write .*it is the data file/);
    assert.equal(readFileSync(csv, 'utf8'), before);
  });

  it('copse report on a saved forest and its training file shows the out-of-bag score of the fit', () => {
    const model = path.join(dir, 'kites.json');
    const fit = copse('fit', kites, '--target', 'outcome', '--trees', '30', '--seed', '5', '--holdout', '0.2', '--save', model, '--json');
    assert.equal(fit.code, 0, fit.stderr);
    const json = JSON.parse(fit.stdout) as FitJson;
    const out = path.join(dir, 'saved.html');
    const r = copse('report', model, kites, '--out', out);
    assert.equal(r.code, 0, r.stderr);
    const html = readFileSync(out, 'utf8');
    assert.equal(headline(html, 'oob'), json.oob!.accuracy);
    assert.ok(html.includes('saved Copse forest'));
    assert.ok(html.includes('data-chart="region-map"'));
  });

  it('copse report on an imported ONNX forest says what needs the bootstrap is unavailable, and scores the file', () => {
    // scikit-learn 1.2.1's forest on iris, converted by test/core/onnx/fixtures/make_sklearn_onnx.py (no Copse metadata).
    const onnx = path.join(root, 'test/core/onnx/fixtures/sklearn-iris.onnx');
    const iris = path.join(root, 'test/fixtures/open/iris.csv');
    const out = path.join(dir, 'import.html');
    const missing = copse('report', onnx, iris, '--by-position', '--leave-out', 'species', '--out', out);
    assert.equal(missing.code, 2);
    assert.match(missing.stderr, /no column "label".*--target/);
    const r = copse('report', onnx, iris, '--by-position', '--leave-out', 'species', '--target', 'species', '--out', out);
    assert.equal(r.code, 0, r.stderr);
    const html = readFileSync(out, 'utf8');
    assert.match(html, /data-unavailable="oob">No out-of-bag score: unavailable for an imported forest/);
    assert.ok(html.includes('data-unavailable="curve"'));
    assert.ok(html.includes('imported ONNX tree ensemble'));
    assert.ok(headline(html, 'test') > 0.9, 'the file scored as test data');
    assert.ok(!/https?:/i.test(html));
  });

  it('copse report refuses to write over the model or the data file', () => {
    const model = path.join(dir, 'kites.json');
    for (const [out, what] of [[model, 'model'], [kites, 'data']]) {
      const r = copse('report', model, kites, '--out', out);
      assert.equal(r.code, 1);
      assert.match(r.stderr, new RegExp(`it is the ${what} file`));
    }
  });
});
