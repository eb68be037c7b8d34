// Table row ↔ the CSV's own data row number (what the panel and protocol call "row").
import * as assert from 'node:assert/strict';
import { loadCsvText } from '../../src/core/csv/load';
import { recordStartLines, RowNumbering } from '../../src/extension/rows/numbering';

describe('extension row numbering', () => {
  it('counts records, not lines, when quoted fields span lines', () => {
    const text = 'h1,h2\n1,"a\nb"\n2,c\n\n3,d\n';
    assert.deepEqual(Array.from(recordStartLines(text, ',')), [1, 2, 4, 6]);
  });

  it('is the identity for one-line rows straight after the header', () => {
    let read = false;
    const n = RowNumbering.build(Int32Array.from([2, 3, 4]), ',', () => {
      read = true;
      return '';
    });
    assert.equal(read, false, 'the file need not be read again');
    assert.deepEqual([0, 1, 2].map((r) => n.dataRow(r)), [1, 2, 3]);
    assert.equal(n.tableRow(2), 1);
    assert.equal(n.tableRow(4), undefined);
  });

  it('keeps file numbering when rows were dropped or sampled', () => {
    // Records: data row 1 on line 2, row 2 on lines 3-4, row 3 on line 5, row 4 on line 6.
    const text = 'x,y\n1,a\n2,"b\nb"\n3,\n4,d\n';
    // The table kept data rows 4 and 2 (in that order), e.g. a sample, or row 3 dropped for a missing target.
    const n = RowNumbering.build(Int32Array.from([6, 3]), ',', () => text);
    assert.equal(n.dataRow(0), 4);
    assert.equal(n.dataRow(1), 2);
    assert.equal(n.tableRow(4), 0);
    assert.equal(n.tableRow(3), undefined);
  });

  it('matches the row numbers core\'s loader gives kept rows, after sampling and dropped targets', async () => {
    const lines = ['id,note,y'];
    for (let i = 1; i <= 60; i++) lines.push(`${i},${i % 7 === 0 ? '"two\nlines"' : 'n'},${i % 5 === 0 ? '' : i % 2}`);
    const text = lines.join('\n') + '\n';
    const { table, delimiter } = await loadCsvText(text, { target: 'y', sampleRows: 25, sampleSeed: 3 });
    assert.ok(table.rowNumber, 'core numbers kept rows');
    const scanned = RowNumbering.build(table.lineOfRow, delimiter, () => text);
    for (let r = 0; r < table.rowCount; r++) assert.equal(scanned.dataRow(r), table.rowNumber[r], `table row ${r}`);
    const fromCore = RowNumbering.build(table.lineOfRow, delimiter, () => assert.fail('no need to read the file'), table.rowNumber);
    assert.equal(fromCore.dataRow(0), table.rowNumber[0]);
  });

  it('handles CRLF and lone-CR line ends', () => {
    assert.deepEqual(Array.from(recordStartLines('a,b\r\n1,"x\r\ny"\r\n2,z\r\n', ',')), [1, 2, 4]);
    assert.deepEqual(Array.from(recordStartLines('a,b\r1,"x\ry"\r2,z\r', ',')), [1, 2, 4]);
  });

  it('agrees with core\'s lineOfRow on a CR-only file with a quoted line break', async () => {
    const text = 'a,b,c\r1,"x\ry",p\r2,z,q\r3,w,p\r';
    const { table, delimiter } = await loadCsvText(text);
    assert.deepEqual(Array.from(table.lineOfRow), [2, 4, 5]);
    const n = RowNumbering.build(table.lineOfRow, delimiter, () => text);
    assert.deepEqual([0, 1, 2].map((r) => n.dataRow(r)), [1, 2, 3]);
  });
});
