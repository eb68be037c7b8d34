// Writing scored copies of a CSV: records as they stand in the file, the forest's columns after them.
import * as assert from 'node:assert/strict';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import * as path from 'node:path';
import { writePredictions, type AddedColumns } from '../../src/core/forest/score-file';

const dir = mkdtempSync(path.join(tmpdir(), 'copse-scored-'));
let n = 0;

async function scored(text: string, delimiter: string, added: AddedColumns, rowOfRecord?: (k: number) => number): Promise<string> {
  const input = path.join(dir, `in${n}.csv`);
  const out = path.join(dir, `out${n++}.csv`);
  writeFileSync(input, text);
  await writePredictions(input, out, delimiter, added, rowOfRecord);
  assert.equal(readFileSync(input, 'utf8'), text, 'the input is untouched');
  return readFileSync(out, 'utf8');
}

const one: AddedColumns = { names: ['predicted'], cells: (i) => [`p${i}`] };

describe('scored copies of a CSV', () => {
  it('copies records verbatim, quoted line breaks, spacing and number formats included', async () => {
    const out = await scored('id,note,x\n1,"two\nlines",0.50\n2, spaced ,1e3\n', ',', one);
    assert.equal(out, 'id,note,x,predicted\n1,"two\nlines",0.50,p0\n2, spaced ,1e3,p1\n');
  });

  it('keeps CRLF line ends and a semicolon delimiter, and skips blank lines as the loader does', async () => {
    const out = await scored('a;b\r\n1;2\r\n\r\n3;4\r\n', ';', one);
    assert.equal(out, 'a;b;predicted\r\n1;2;p0\r\n3;4;p1\r\n');
  });

  it('keeps CR-only line ends', async () => {
    assert.equal(await scored('a,b\r1,2\r', ',', one), 'a,b,predicted\r1,2,p0\r');
  });

  it('quotes added cells as RFC 4180 asks (delimiter, quote, line break)', async () => {
    const out = await scored('a\n1\n', ',', { names: ['say "hi"', 'x,y'], cells: () => ['line\nbreak', 'plain'] });
    assert.equal(out, 'a,"say ""hi""","x,y"\n1,"line\nbreak",plain\n');
  });

  it('leaves the cells blank for a record the table does not hold', async () => {
    const out = await scored('a\n1\n2\n3\n', ',', one, (k) => (k === 1 ? -1 : k));
    assert.equal(out, 'a,predicted\n1,p0\n2,\n3,p2\n');
  });
});
