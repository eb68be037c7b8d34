// The editor's report never goes over an input: the same file by another spelling (a relative path, a symbolic
// link) is refused as well, and any other name is let through.
import * as assert from 'node:assert/strict';
import { mkdtempSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { reportRefusal, suggestedReportPath } from '../../src/extension/commands/reportPath';

describe('editor report path', () => {
  const dir = mkdtempSync(path.join(tmpdir(), 'copse-report-path-'));
  const data = path.join(dir, 'kites.csv');
  writeFileSync(data, 'a,b\n1,2\n');
  const inputs = [{ file: data, what: 'the data file' }];

  it('suggests a name beside the data file', () => {
    assert.equal(suggestedReportPath(data), path.join(dir, 'kites-report.html'));
  });

  it('refuses the data file, also through a link or a relative spelling', () => {
    assert.match(reportRefusal(data, inputs) ?? '', /will not write the report over kites\.csv: it is the data file/);
    const link = path.join(dir, 'link.csv');
    symlinkSync(data, link);
    assert.ok(reportRefusal(link, inputs));
    assert.ok(reportRefusal(path.relative(process.cwd(), data), inputs));
  });

  it('lets any other file through, existing or not', () => {
    assert.equal(reportRefusal(path.join(dir, 'kites-report.html'), inputs), undefined);
    assert.equal(reportRefusal(path.join(dir, 'kites.csv.html'), inputs), undefined);
  });
});
