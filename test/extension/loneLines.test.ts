// Hovers on a file fitted on a sample: rows the sample left out are scored one at a time, so every data line
// gets an answer, and it is the answer the forest gives that row when the whole file is scored.
import * as assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { loadCsv, loadCsvText } from '../../src/core/csv/load';
import { encodeTable, predictEncoded } from '../../src/core/forest/predict';
import { dataRowAtLine, hasLoneLines, scoreLoneLine } from '../../src/extension/editor/loneLines';
import { FIXTURES, fitFixture, readerOf, type Fitted } from './helpers';

describe('hovers on rows the fitted sample left out', function () {
  this.timeout(60000);
  const file = path.join(FIXTURES, 'iris.csv');
  let f: Fitted;
  before(async () => {
    f = await fitFixture(file, 'species', { trees: 30, seed: 4 }, { sampleRows: 60 });
  });
  after(async () => f?.session.dispose());

  it('scores a left-out line alone, as the forest scores that row of the whole file', async () => {
    const { session } = f;
    assert.equal(session.table.rowCount, 60);
    assert.ok(hasLoneLines(session));
    const read = readerOf(readFileSync(file, 'utf8'));
    const whole = await loadCsv(file);
    const x = encodeTable(session.forest.schema, whole.table);
    const expected = predictEncoded(session.forest, x, whole.table.rowCount);
    const T = session.forest.trees.length;
    let checked = 0;
    for (let line = 2; line <= 151; line++) {
      if (session.rowAtLine(line, read) !== undefined) continue;
      const lone = await scoreLoneLine(session, line, read, loadCsvText);
      assert.ok(lone, `line ${line}`);
      const r = line - 2; // iris: header on line 1, one record per line
      for (let t = 0; t < T; t++) assert.equal(lone.store.vote(t, 0), expected.votes[t * whole.table.rowCount + r], `line ${line} tree ${t}`);
      const hover = session.hoverOther(lone, 0);
      assert.match(hover, new RegExp(`row ${r + 1} \\(not in the sample the forest was fitted on`));
      assert.match(hover, /Label: /);
      checked++;
    }
    assert.equal(checked, 90);
    assert.equal(await scoreLoneLine(session, 1, read, loadCsvText), undefined, 'the header is no row');
  });

  it('names the line instead of a row number when blank lines shift the numbering, and skips blank lines', async () => {
    const dir = mkdtempSync(path.join(tmpdir(), 'copse-lone-'));
    const text = readFileSync(file, 'utf8').split('\n');
    text.splice(80, 0, ''); // a blank line after data row 79
    const shifted = path.join(dir, 'iris-gap.csv');
    writeFileSync(shifted, text.join('\n'));
    const g = await fitFixture(shifted, 'species', { trees: 10, seed: 4 }, { sampleRows: 60 });
    try {
      const read = readerOf(text.join('\n'));
      assert.equal(dataRowAtLine(g.session, 40), undefined);
      assert.equal(await scoreLoneLine(g.session, 81, read, loadCsvText), undefined, 'a blank line');
      let line = 2;
      while (g.session.rowAtLine(line, read) !== undefined) line++;
      const lone = await scoreLoneLine(g.session, line, read, loadCsvText);
      assert.ok(lone);
      assert.match(g.session.hoverOther(lone, 0), new RegExp(`line ${line} \\(not in the sample`));
    } finally {
      await g.session.dispose();
    }
  });
});
