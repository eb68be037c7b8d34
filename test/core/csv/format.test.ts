// Reading the CSV format itself: delimiters, encodings, line ends, quoting, and where each row starts.
import * as assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { loadCsv, loadCsvText } from '../../../src/core/csv/load';
import { loadFromSource } from '../../../src/core/csv/loader';
import { textSource } from '../../../src/core/csv/sources';
import type { LoadResult } from '../../../src/core/csv/types';
import { FixtureDir, assertUnchanged, kinds, numeric, snapshot, texts } from './helpers';

const lines = (r: LoadResult) => Array.from(r.table.lineOfRow);

describe('csv format', () => {
  let dir: FixtureDir;
  before(() => (dir = new FixtureDir()));
  after(() => dir.remove());

  for (const [name, d] of [['comma', ','], ['semicolon', ';'], ['tab', '\t'], ['pipe', '|']] as const) {
    it(`detects and reads a ${name}-separated file`, async () => {
      const rows = [['x', 'colour', 'y'], ['1.5', 'red', '10'], ['2.5', 'blue', '20'], ['3.5', 'red', '30'], ['1.5', 'blue', '10']];
      const file = dir.write(`${name}.csv`, rows.map((r) => r.join(d)).join('\n') + '\n');
      const before = snapshot(file);
      const r = await loadCsv(file);
      assertUnchanged(file, before);
      assert.equal(r.delimiter, d);
      assert.deepEqual(r.header, ['x', 'colour', 'y']);
      assert.deepEqual(numeric(r, 'x'), [1.5, 2.5, 3.5, 1.5]);
      assert.deepEqual(texts(r, 'colour'), ['red', 'blue', 'red', 'blue']);
      assert.deepEqual(numeric(r, 'y'), [10, 20, 30, 10]);
    });
  }

  it('uses a delimiter it is given instead of guessing', async () => {
    const r = await loadCsvText('a,b;c\n1,2;3\n1,4;5\n', { delimiter: ';' });
    assert.deepEqual(r.header, ['a,b', 'c']);
    assert.equal(r.delimiter, ';');
  });

  it('reads UTF-8 with and without a byte-order mark (EF BB BF, common practice) alike, and the mark is not part of the first name', async () => {
    const body = 'größe,farbe\n1,rot\n2,grün\n1,rot\n';
    const plain = await loadCsvText(body);
    const marked = await loadCsvText('\ufeff' + body);
    assert.deepEqual(marked.header, ['größe', 'farbe']);
    assert.deepEqual(marked.header, plain.header);
    assert.deepEqual(texts(marked, 'farbe'), ['rot', 'grün', 'rot']);
    assert.deepEqual(lines(marked), [2, 3, 4]);
  });

  it('reads CRLF line ends (RFC 4180 section 2, rule 1), lone CR ones, and a mix', async () => {
    const want = { x: [1, 2, 1], c: ['a', 'b', 'a'] };
    for (const eol of ['\r\n', '\r', 'mixed']) {
      const text = eol === 'mixed' ? 'x,c\r\n1,a\n2,b\r1,a\r\n' : ['x,c', '1,a', '2,b', '1,a', ''].join(eol);
      const r = await loadCsvText(text);
      assert.deepEqual(numeric(r, 'x'), want.x, JSON.stringify(eol));
      assert.deepEqual(texts(r, 'c'), want.c, JSON.stringify(eol));
      assert.deepEqual(lines(r), [2, 3, 4], JSON.stringify(eol));
    }
  });

  it('keeps delimiters, doubled quotes and line breaks inside quoted fields (RFC 4180 section 2, rules 5-7)', async () => {
    const text = 'note,n\n"a, b",1\n"say ""hi""",2\n"two\nlines",3\n"a, b",1\n';
    const r = await loadCsvText(text);
    assert.deepEqual(texts(r, 'note'), ['a, b', 'say "hi"', 'two\nlines', 'a, b']);
    assert.deepEqual(numeric(r, 'n'), [1, 2, 3, 1]);
  });

  it('maps each row to the physical line it starts on when quoted fields span lines', async () => {
    const text = ['id,note,n', '1,"first', 'second', 'third",5', '2,plain,6', '3,"x', 'y",7', '4,z,8', ''].join('\n');
    const r = await loadCsvText(text, { columnTypes: { id: 'categorical' } });
    assert.deepEqual(lines(r), [2, 5, 6, 8]);
    assert.deepEqual(texts(r, 'id'), ['1', '2', '3', '4']);
  });

  it('counts a CRLF inside quotes as one line break, as editors do (common practice)', async () => {
    const text = 'id,note\r\n1,"a\r\nb"\r\n2,"c\r\n\r\nd"\r\n3,e\r\n';
    const r = await loadCsvText(text, { columnTypes: { id: 'categorical', note: 'categorical' } });
    assert.deepEqual(lines(r), [2, 4, 7]);
    assert.deepEqual(texts(r, 'note'), ['a\r\nb', 'c\r\n\r\nd', 'e']);
  });

  it('skips blank and whitespace-only lines but keeps counting them (common practice; RFC 4180 has no blank records)', async () => {
    const text = '\n\nx,c\n1,a\n\n   \n2,b\n\t\n1,a\n\n';
    const r = await loadCsvText(text);
    assert.equal(r.rowsRead, 3);
    assert.deepEqual(lines(r), [4, 7, 9]);
    assert.deepEqual(numeric(r, 'x'), [1, 2, 1]);
  });

  it('trims cells, quoted or not, and header names (on purpose unlike RFC 4180 section 2, rule 4, where spaces belong to the field)', async () => {
    const r = await loadCsvText(' x , c \n 1 ,  a \n2," b "\n 1, a\n');
    assert.deepEqual(r.header, ['x', 'c']);
    assert.deepEqual(numeric(r, 'x'), [1, 2, 1]);
    assert.deepEqual(texts(r, 'c'), ['a', 'b', 'a']);
  });

  it('accepts a quote after blanks at the start of a field, and keeps a stray quote inside unquoted text (more lenient than RFC 4180 section 2, rule 5)', async () => {
    const r = await loadCsvText('h,c\n1, "x, y"\n2,5\'10"\n1, "x, y"\n');
    assert.deepEqual(texts(r, 'c'), ['x, y', '5\'10"', 'x, y']);
  });

  it('reads a last line without a line break (RFC 4180 section 2, rule 2)', async () => {
    const r = await loadCsvText('x,c\n1,a\n2,b\n1,a');
    assert.deepEqual(lines(r), [2, 3, 4]);
  });

  it('gives the same result whatever size the chunks arrive in (records cut across chunk boundaries)', async () => {
    const text = '\ufeffid;note;n;größe\r\n1;"a;\r\nb";1,5;x\r\n\r\n2;plain;2;ü\r\n3;"q ""r""";3;x\r\n4;"s\nt";4;ü\r\n';
    const types = { id: 'categorical', note: 'categorical' } as const;
    const whole = await loadCsvText(text, { columnTypes: types });
    for (const size of [1, 2, 3, 5, 7, 64]) {
      const r = await loadFromSource(textSource(text, '<text>', size), { columnTypes: types });
      assert.deepEqual(lines(r), lines(whole), `chunks of ${size}`);
      assert.deepEqual(r.table.columns, whole.table.columns, `chunks of ${size}`);
      assert.equal(r.fingerprint, whole.fingerprint);
      assert.equal(r.delimiter, ';');
    }
    assert.deepEqual(lines(whole), [2, 5, 6, 7]);
    assert.deepEqual(texts(whole, 'note'), ['a;\r\nb', 'plain', 'q "r"', 's\nt']);
  });

  it('reads a file and the same text identically', async () => {
    const text = 'x,c,d\n1,a,2024-01-01\n2,b,2024-01-02\n1,a,2024-01-02\n';
    const file = dir.write('same.csv', text);
    const a = await loadCsv(file);
    const b = await loadCsvText(text);
    assert.deepEqual(a.table, b.table);
    assert.deepEqual(a.dropped, b.dropped);
    assert.equal(a.fingerprint, b.fingerprint);
  });

  it('fingerprints the file bytes with sha256, byte-order mark included', async () => {
    const bytes = Buffer.from('\ufeffx,c\r\n1,a\r\n2,b\r\n1,a\r\n', 'utf8');
    const file = dir.write('print.csv', bytes);
    const r = await loadCsv(file);
    assert.equal(r.fingerprint, createHash('sha256').update(readFileSync(file)).digest('hex'));
    // Computed outside the project with GNU coreutils: printf '\xef\xbb\xbfx,c\r\n1,a\r\n2,b\r\n1,a\r\n' | sha256sum
    assert.equal(r.fingerprint, 'ac0ab5b282167915c87e72446183840edb070a390f262f553bee64e46a16fdf5');
  });

  it('reads a file larger than one chunk and many sniff windows', async () => {
    const parts = ['a,b,c'];
    for (let i = 0; i < 60000; i++) parts.push(`${i % 97},${i % 3 === 0 ? 'x' : 'y'},${(i * 0.25).toFixed(2)}`);
    const file = dir.write('big.csv', parts.join('\n') + '\n');
    const r = await loadCsv(file);
    assert.equal(r.rowsRead, 60000);
    assert.equal(r.table.rowCount, 60000);
    assert.deepEqual(kinds(r), { a: 'numeric', b: 'categorical', c: 'numeric' });
    assert.equal(r.table.lineOfRow[59999], 60001);
    assert.equal(numeric(r, 'c')[59999], 59999 * 0.25);
  });
});
