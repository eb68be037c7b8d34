// Escape sequences in the data (a header name, a class, a level) are shown as escapes in everything the command
// line prints for a person, and kept exactly as they are in JSON and CSV (issue 12, terminal-safe output).
import * as assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import type { FitJson } from './output';

const root = path.join(__dirname, '..', '..', '..');

function copse(args: string[], cwd: string): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [path.join(root, 'bin/copse.js'), ...args], { encoding: 'utf8', cwd });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

const RED = '\x1b[31m';
const TITLE = '\x1b]0;owned\x07';
/** Any raw control character a terminal would act on (tab and line feed are text). */
const RAW = /[\x00-\x08\x0b-\x1f\x7f-\x9f\u202a-\u202e\u2066-\u2069]/;

describe('control characters from the data, printed for people and for programs', function () {
  this.timeout(120000);
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-terminal-'));
  const data = path.join(dir, 'k.csv');
  const model = path.join(dir, 'm.json');
  const wind = `wind${RED}_kmh`;
  const soared = `soa${TITLE}red`;
  const mylar = `my\u202Elar`;

  before(() => {
    const text = readFileSync(path.join(root, 'demo/kite-flights.csv'), 'utf8');
    writeFileSync(data, text.replace('wind_kmh', wind).replaceAll(',soared', `,${soared}`).replaceAll(',mylar,', `,${mylar},`));
    const r = copse(['fit', data, '--target', 'outcome', '--trees', '10', '--save', model], dir);
    assert.equal(r.code, 0, r.stderr);
  });

  it('escapes them in the fit report and keeps them in its JSON', () => {
    const report = copse(['fit', data, '--target', 'outcome', '--trees', '10'], dir);
    assert.equal(report.code, 0, report.stderr);
    assert.doesNotMatch(report.stdout, RAW);
    assert.ok(report.stdout.includes('wind\\x1b[31m_kmh'), 'the feature name, escaped');
    assert.ok(report.stdout.includes('soa\\x1b]0;owned\\x07red'), 'the class, escaped');
    const json = copse(['fit', data, '--target', 'outcome', '--trees', '10', '--json'], dir);
    const parsed = JSON.parse(json.stdout) as FitJson;
    assert.ok(parsed.features.includes(wind));
    assert.ok(parsed.oob?.confusion?.labels.includes(soared));
  });

  it('escapes them in votes and explain, and in their warnings', () => {
    const votes = copse(['votes', model, data, '--rows', '1,2,3'], dir);
    assert.equal(votes.code, 0, votes.stderr);
    assert.doesNotMatch(votes.stdout + votes.stderr, RAW);
    assert.ok(votes.stdout.includes('soa\\x1b]0;owned\\x07red'));
    const explain = copse(['explain', model, data, '--rows', '1'], dir);
    assert.equal(explain.code, 0, explain.stderr);
    assert.doesNotMatch(explain.stdout + explain.stderr, RAW);
    assert.ok(explain.stdout.includes('wind\\x1b[31m_kmh'));
    assert.ok(explain.stdout.includes('my\\u202elar'), 'a bidirectional override in a value, escaped');
  });

  it('keeps them as they are in the CSV that predict prints', () => {
    const csv = copse(['predict', model, data], dir);
    assert.equal(csv.code, 0, csv.stderr);
    assert.ok(csv.stdout.includes(`predicted_outcome,probability_${soared}`) || csv.stdout.includes(soared), 'the class, raw');
    const out = copse(['predict', model, data, '--out', '-'], dir);
    assert.ok(out.stdout.startsWith(`flight_id,${wind},`), 'the header, raw');
  });

  it('escapes them in error messages: an option value and a file name', () => {
    const target = copse(['fit', data, '--target', `no${RED}pe`], dir);
    assert.notEqual(target.code, 0);
    assert.doesNotMatch(target.stderr, RAW);
    assert.ok(target.stderr.includes('no\\x1b[31mpe'), target.stderr);
    const file = copse(['fit', `gone${TITLE}.csv`, '--target', 'outcome'], dir);
    assert.equal(file.code, 1);
    assert.equal(file.stderr, 'copse fit: Cannot read gone\\x1b]0;owned\\x07.csv: there is no such file.\n');
  });
});
