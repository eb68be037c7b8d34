// Bad input: each case fails with one DataError sentence naming the file, and the line and column where they
// apply, and leaves the file exactly as it was.
import * as assert from 'node:assert/strict';
import { loadFromSource } from '../../../src/core/csv/loader';
import { fileSource } from '../../../src/core/csv/sources';
import { FixtureDir, assertUnchanged, loadError, snapshot } from './helpers';

describe('csv bad input', () => {
  let dir: FixtureDir;
  before(() => (dir = new FixtureDir()));
  after(() => dir.remove());

  it('an empty file', async () => {
    await loadError(dir.write('empty.csv', ''), undefined, 'is empty');
  });

  it('a file of blank lines (and a byte-order mark) is empty too', async () => {
    await loadError(dir.write('blank.csv', '\ufeff\n  \r\n \n'), undefined, 'is empty');
  });

  it('a header with no data rows', async () => {
    await loadError(dir.write('header.csv', 'a,b,c\n\n\n'), undefined, 'header (line 1)', 'no data rows');
  });

  it('a row with fewer fields than the header: its line, both counts, the column left without a value', async () => {
    await loadError(dir.write('short.csv', 'a,b,c\n1,2,3\n4,5\n'), undefined, 'line 3 has 2 fields', 'header (line 1) has 3', "column 'c'");
  });

  it('a row with more fields than the header', async () => {
    await loadError(dir.write('long.csv', 'a,b,c\n1,2,3\n4,5,6\n7,8,9,10\n'), undefined, 'line 4 has 4 fields', 'has 3', "1 field after column 'c'");
  });

  it('a ragged row after a multi-line quoted field is placed on its own physical line', async () => {
    await loadError(dir.write('ragged-late.csv', 'a,b\n"x\ny",1\n\n2\n'), undefined, 'line 5 has 1 field,', "column 'b'");
  });

  it('an unclosed quote: the line and column where it opened, not the end of the file', async () => {
    const text = 'id,note,n\n1,fine,2\n2,"never closed,3\n3,more,4\n4,text,5\n';
    await loadError(dir.write('quote.csv', text), undefined, 'line 3', "column 'note'", 'closing quote is missing');
  });

  it('an unclosed quote after CRLF-quoted fields and blank lines still gets its physical line', async () => {
    const text = 'a,b\r\n"x\r\ny",1\r\n\r\n2,"open\r\n3,4\r\n';
    await loadError(dir.write('quote-crlf.csv', text), undefined, 'line 5', "column 'b'");
  });

  it('an unclosed quote in the header', async () => {
    await loadError(dir.write('quote-head.csv', 'a,"b\n1,2\n'), undefined, 'line 1', 'closing quote is missing');
  });

  it('text after the closing quote of a quoted field (RFC 4180 section 2, rule 5: the quotes enclose the whole field)', async () => {
    await loadError(dir.write('after-quote.csv', 'a,b\n1,2\n3,"x" y\n'), undefined, 'line 3', "column 'b'", 'after the closing quote');
  });

  it('duplicate header names: both columns and the name', async () => {
    await loadError(dir.write('dup.csv', 'x,y,z,y\n1,2,3,4\n'), undefined, 'line 1', 'columns 2 and 4', "'y'");
  });

  it('an empty header name, with its neighbour', async () => {
    await loadError(dir.write('noname.csv', 'a,,c\n1,2,3\n'), undefined, 'line 1', 'column 2', "after 'a'", 'empty name');
  });

  it('an unknown target, listing names that exist and a near match', async () => {
    const msg = await loadError(dir.write('target.csv', 'Price,size,colour\n1,2,a\n2,3,b\n'), { target: 'price' }, "'price'", "'Price', 'size', 'colour'");
    assert.match(msg, /did you mean 'Price'\?\)\.$/);
  });

  it('an unknown target in a wide file lists a few names and the count', async () => {
    const header = Array.from({ length: 30 }, (_, i) => `c${i}`);
    const file = dir.write('wide.csv', header.join(',') + '\n' + header.map((_, i) => i).join(',') + '\n');
    await loadError(file, { target: 'zz' }, "'c0'", '30 in all');
  });

  it('a target with a single value', async () => {
    await loadError(dir.write('single.csv', 'x,y\n1,yes\n2,yes\n3,\n'), { target: 'y' }, "'y'", "single value ('yes')", '2 rows');
  });

  it('a target that is missing on every row', async () => {
    await loadError(dir.write('no-target.csv', 'x,y\n1,NA\n2,\n'), { target: 'y' }, "'y'", 'none of the 2 rows');
  });

  it('a binary file (NUL bytes), with the line of the first one', async () => {
    const bytes = Buffer.concat([Buffer.from('a,b\n1,2\n3,'), Buffer.from([0, 0, 1, 2]), Buffer.from('\n')]);
    await loadError(dir.write('binary.csv', bytes), undefined, 'line 3', 'NUL byte', 'binary');
  });

  it('a file that is not UTF-8 (Latin-1 é), with the line', async () => {
    const bytes = Buffer.from('name,n\nabc,1\ncaf\xe9,2\n', 'latin1');
    await loadError(dir.write('latin1.csv', bytes), undefined, 'line 3', 'not valid UTF-8');
  });

  it('a UTF-16 file, told by its byte-order mark', async () => {
    const bytes = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('a,b\n1,2\n', 'utf16le')]);
    await loadError(dir.write('utf16.csv', bytes), undefined, 'UTF-16');
  });

  it('invalid UTF-8 (Unicode Standard, Table 3-7 well-formed sequences) is found wherever a chunk boundary cuts the file, and valid text cut anywhere passes', async () => {
    const good = Buffer.from('a,b\nü€😀,1\nx,2\nü€😀,1\n', 'utf8');
    const bad = Buffer.concat([Buffer.from('a,b\nü€,1\nx'), Buffer.from([0xe2, 0x82]), Buffer.from(',2\n')]); // € cut short
    const goodFile = dir.write('cut-good.csv', good);
    const badFile = dir.write('cut-bad.csv', bad);
    for (const size of [1, 2, 3, 4, 5, 7]) {
      const ok = await loadFromSource(fileSource(goodFile, size));
      assert.equal(ok.rowsRead, 3);
      await assert.rejects(loadFromSource(fileSource(badFile, size)), (e: Error) => e.name === 'DataError' && /line 3 is not valid UTF-8/.test(e.message));
    }
    // A sequence cut off by the end of the file.
    await loadError(dir.write('cut-end.csv', Buffer.concat([Buffer.from('a,b\n1,2\n3,'), Buffer.from([0xf0, 0x9f])])), undefined, 'line 3', 'not valid UTF-8');
  });

  it('a file that does not exist', async () => {
    const file = `${dir.path}/nope.csv`;
    await assert.rejects(loadFromSource(fileSource(file)), (e: Error) => e.name === 'DataError' && e.message.includes(file) && /no such file/.test(e.message));
  });

  it('a type setting that is not a type', async () => {
    const file = dir.write('badtype.csv', 'a,b\n1,2\n2,3\n');
    await loadError(file, { columnTypes: { a: 'text' as never } }, "'a'", "'text'");
  });

  it('a column forced to numeric that holds no number: the line of its first text', async () => {
    await loadError(dir.write('forced-num.csv', 'a,b\n1,x\n2,y\n3,\n'), { columnTypes: { b: 'numeric' } }, "'b'", 'line 2', "'x'");
  });

  it('a column forced to boolean with three values', async () => {
    await loadError(dir.write('forced-bool.csv', 'a,b\n1,x\n2,y\n3,z\n'), { columnTypes: { b: 'boolean' } }, "'b'", '3 distinct values');
  });

  it('excluding the target', async () => {
    await loadError(dir.write('ex-target.csv', 'a,b\n1,x\n2,y\n'), { target: 'b', columnTypes: { b: 'exclude' } }, "'b'", 'cannot be excluded');
  });

  it('bad option values', async () => {
    const file = dir.write('opts.csv', 'a,b\n1,x\n2,y\n');
    await loadError(file, { delimiter: '::' }, 'delimiter');
    await loadError(file, { sampleRows: 0 }, 'sample');
    await loadError(file, { maxLevels: 1.5 }, 'distinct values');
  });

  it('a good file is left unchanged by a successful load too', async () => {
    const file = dir.write('good.csv', 'a,b\n1,x\n2,y\n1,x\n');
    const before = snapshot(file);
    await loadFromSource(fileSource(file));
    assertUnchanged(file, before);
  });
});
