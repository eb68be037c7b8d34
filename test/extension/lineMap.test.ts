// Line ↔ row mapping for hovers and selections. The CSVs here are written so each record's lines are known
// by construction; quoting follows RFC 4180 (section 2: fields with line breaks or quotes are quoted, and a
// quote inside is doubled).
import * as assert from 'node:assert/strict';
import { LineIndex, recordSpan, scanLine, type LineReader } from '../../src/extension/rows/lineMap';

function reader(text: string): LineReader {
  const lines = text.split('\n').map((l) => l.replace(/\r$/, ''));
  return (line) => lines[line - 1];
}

describe('extension line map', () => {
  // line 1 header; row 0 on line 2; row 1 spans 3-5 (quoted field with two line breaks, one blank);
  // line 6 blank between records; row 2 on 7; row 3 spans 8-9 with a doubled quote before the break.
  const text = [
    'id,note,y',
    '1,plain,a',
    '2,"first line',
    '',
    'third line",b',
    '',
    '3,"a, b",a',
    '4,"say ""hi""',
    'there",b',
  ].join('\n');
  const lineOfRow = Int32Array.from([2, 3, 7, 8]);
  const read = reader(text);
  const index = new LineIndex(lineOfRow, ',');

  it('maps every line of a multi-line record to that record, and nothing else to it', () => {
    const expected: Record<number, number | undefined> = { 1: undefined, 2: 0, 3: 1, 4: 1, 5: 1, 6: undefined, 7: 2, 8: 3, 9: 3, 10: undefined };
    for (const [line, row] of Object.entries(expected)) assert.equal(index.rowAt(Number(line), read), row, `line ${line}`);
  });

  it('gives the header and blank lines between records no row', () => {
    assert.equal(index.rowAt(1, read), undefined);
    assert.equal(index.rowAt(6, read), undefined);
  });

  it('treats a blank line inside a quoted field as part of its record', () => {
    assert.equal(index.rowAt(4, read), 1);
  });

  it('lists the rows a selection touches, in file order', () => {
    assert.deepEqual(index.rowsBetween(4, 8, read), [1, 2, 3]);
    assert.deepEqual(index.rowsBetween(1, 1, read), []);
    assert.deepEqual(index.rowsBetween(6, 6, read), []);
    assert.deepEqual(index.rowsBetween(9, 9, read), [3]);
  });

  it('measures record spans with quoted line breaks', () => {
    assert.deepEqual([2, 3, 7, 8].map((l) => recordSpan(read, l, ',')), [1, 3, 1, 2]);
  });

  it('only opens a quote at the start of a field', () => {
    // 5"3 is a literal quote in an unquoted field: the record ends at the line end.
    assert.equal(scanLine('1,5"3,x', false, ','), false);
    assert.equal(scanLine('1, "open', false, ','), true);
    assert.equal(scanLine('x\t"open', false, '\t'), true);
  });

  it('handles rows out of file order (a sampled table) and skipped records', () => {
    // Rows sampled as records 4, 1 and 3 of the file above: row 1 (line 3..5) is absent here.
    const sampled = new LineIndex(Int32Array.from([8, 2, 7]), ',');
    assert.equal(sampled.rowAt(9, read), 0);
    assert.equal(sampled.rowAt(2, read), 1);
    assert.equal(sampled.rowAt(7, read), 2);
    assert.equal(sampled.rowAt(3, read), undefined, 'the start of an unsampled record');
    assert.equal(sampled.rowAt(4, read), undefined, 'a continuation of an unsampled record');
    assert.deepEqual(sampled.rowsBetween(1, 9, read), [1, 2, 0]);
  });

  it('reads CRLF files the same once line ends are stripped', () => {
    const crlf = reader(text.replace(/\n/g, '\r\n'));
    for (let line = 1; line <= 9; line++) assert.equal(index.rowAt(line, crlf), index.rowAt(line, read));
  });

  it('works with a multi-character delimiter', () => {
    const t = 'a||b\n1||"x\ny"\n2||z';
    const idx = new LineIndex(Int32Array.from([2, 4]), '||');
    assert.deepEqual([1, 2, 3, 4].map((l) => idx.rowAt(l, reader(t))), [undefined, 0, 0, 1]);
  });
});
