// What each column becomes: missing values, inferred kinds, drop reasons, overrides, dates, the target.
import * as assert from 'node:assert/strict';
import { loadCsvText } from '../../../src/core/csv/load';
import { kinds, numeric, reasonOf, texts } from './helpers';

/** Rows of `n` where column values come from functions of the row index. */
function csv(columns: Record<string, (i: number) => string | number>, n: number): string {
  const names = Object.keys(columns);
  const rows = [names.join(',')];
  for (let i = 0; i < n; i++) rows.push(names.map((k) => String(columns[k](i))).join(','));
  return rows.join('\n') + '\n';
}

const cycle = (...values: string[]) => (i: number) => values[i % values.length];

describe('csv columns', () => {
  describe('missing values', () => {
    it('treats empty, NA, N/A, NaN, null, ? and - as missing by default, after trimming (the issue\'s list; common practice)', async () => {
      const tokens = ['', 'NA', 'N/A', 'NaN', 'null', '?', '-', '  NA ', ' '];
      const text = 'x,c\n' + tokens.map((t) => `${t},${t}`).join('\n') + '\n1,a\n2,b\n1,a\n';
      const r = await loadCsvText(text);
      assert.deepEqual(numeric(r, 'x').slice(0, tokens.length).map(Number.isNaN), tokens.map(() => true));
      assert.deepEqual(numeric(r, 'x').slice(tokens.length), [1, 2, 1]);
      assert.deepEqual(texts(r, 'c'), [...tokens.map(() => null), 'a', 'b', 'a']);
    });

    it('uses the tokens it is given instead, case-sensitively, and an empty cell stays missing', async () => {
      const text = 'x,c\n-999,a\n,b\nNA,a\n5,b\n-999,a\n';
      const r = await loadCsvText(text, { missingTokens: ['-999'] });
      // NA is now text, not missing: 1 of 3 non-missing cells, too many for a numeric column.
      assert.deepEqual(texts(r, 'x'), [null, null, 'NA', '5', null]);
      const lower = await loadCsvText('x,c\nna,a\n1,b\n2,a\n3,b\n4,a\n5,b\n6,a\n7,b\n8,a\n9,b\n10,a\n11,b\n12,a\n13,b\n14,a\n15,b\n16,a\n17,b\n18,a\n19,b\n20,a\n', {
        missingTokens: ['NA'],
      });
      assert.equal(lower.warnings.length, 1, 'na is not NA: a stray text cell');
    });
  });

  describe('kinds', () => {
    it('infers numeric, categorical and boolean, keeping 0/1 numeric', async () => {
      const r = await loadCsvText(
        csv({ num: (i) => (i * 1.5) % 7, cat: cycle('red', 'green', 'blue'), flag: cycle('yes', 'no', 'no'), bit: cycle('0', '1') }, 12),
      );
      assert.deepEqual(kinds(r), { num: 'numeric', cat: 'categorical', flag: 'boolean', bit: 'numeric' });
    });

    it('recognises each boolean pair case-insensitively, ordered false then true (common practice)', async () => {
      for (const [f, t] of [['false', 'true'], ['No', 'YES'], ['F', 't'], ['n', 'Y']]) {
        const r = await loadCsvText(csv({ x: (i) => i % 4, b: (i) => (i % 3 === 0 ? t : f) }, 9));
        assert.equal(kinds(r).b, 'boolean', `${f}/${t}`);
        assert.deepEqual(texts(r, 'b'), Array.from({ length: 9 }, (_, i) => (i % 3 === 0 ? t : f)));
        const col = r.table.columns.find((c) => c.name === 'b');
        assert.ok(col && col.kind === 'boolean');
        assert.deepEqual(col.levels, [f, t]);
      }
    });

    it('merges case variants of a boolean value into one level', async () => {
      const r = await loadCsvText('x,b\n1,yes\n2,Yes\n3,no\n1,YES\n');
      const col = r.table.columns.find((c) => c.name === 'b');
      assert.ok(col && col.kind === 'boolean');
      assert.deepEqual(col.levels, ['no', 'yes']);
      assert.deepEqual(Array.from(col.codes), [1, 1, 0, 1]);
    });

    it('does not call two unrelated values boolean', async () => {
      const r = await loadCsvText(csv({ x: (i) => i % 3, s: cycle('yes', 'maybe') }, 6));
      assert.equal(kinds(r).s, 'categorical');
    });

    it('orders levels by first appearance, the same on every load', async () => {
      const text = csv({ x: (i) => i % 4, c: cycle('pear', 'apple', 'fig', 'apple', 'pear') }, 20);
      const a = await loadCsvText(text);
      const b = await loadCsvText(text);
      const col = a.table.columns.find((c) => c.name === 'c');
      assert.ok(col && col.kind === 'categorical');
      assert.deepEqual(col.levels, ['pear', 'apple', 'fig']);
      assert.deepEqual(a.table, b.table);
    });

    it('reads a column of numbers with much text as categorical, numbers written as numbers', async () => {
      const r = await loadCsvText(csv({ x: (i) => i % 4, v: cycle('1', '2.0', 'many', '2') }, 8));
      assert.equal(kinds(r).v, 'categorical');
      assert.deepEqual(texts(r, 'v'), ['1', '2', 'many', '2', '1', '2', 'many', '2']);
    });
  });

  describe('stray text in a numeric column', () => {
    it('makes a few text cells missing, with a warning giving the count and the first line (common practice: a few typos do not make a column text)', async () => {
      const text = csv({ k: (i) => i % 5, v: (i) => (i === 6 ? 'oops' : i === 30 ? 'n.a.' : (i * 0.5) % 9) }, 60);
      const r = await loadCsvText(text, {}, 'data.csv');
      const v = numeric(r, 'v');
      assert.ok(Number.isNaN(v[6]) && Number.isNaN(v[30]));
      assert.equal(v[7], 3.5);
      assert.equal(r.warnings.length, 1);
      assert.match(r.warnings[0], /data\.csv: column 'v' is numeric, but 2 cells of text became missing \(the first on line 8: 'oops'\)/);
    });

    it('keeps the column as text when more than 5% of its cells are text', async () => {
      const r = await loadCsvText(csv({ k: (i) => i % 5, v: (i) => (i % 10 === 0 ? 'x' : i % 3) }, 40));
      assert.equal(kinds(r).v, 'categorical');
      assert.deepEqual(r.warnings, []);
    });

    it('reports the first stray line even when the column has too many values to keep their text', async () => {
      const text = csv({ k: (i) => i % 5, v: (i) => (i === 4500 ? 'bad' : i / 7) }, 6000);
      const r = await loadCsvText(text, { maxLevels: 50 });
      assert.ok(Number.isNaN(numeric(r, 'v')[4500]));
      assert.match(r.warnings[0], /1 cell of text became missing \(the first on line 4502: 'bad'\)/);
    });
  });

  describe('dropped columns', () => {
    it('drops all-distinct text as a row identifier (common practice: it cannot generalise)', async () => {
      const r = await loadCsvText(csv({ id: (i) => `row-${i}`, x: (i) => i % 3 }, 10));
      assert.match(reasonOf(r, 'id'), /row identifier: each of the 10 rows has a different value/);
    });

    it('drops all-distinct whole numbers as a row identifier, but not all-distinct measurements', async () => {
      const r = await loadCsvText(csv({ id: (i) => 1000 + i * 3, w: (i) => 1.25 + i, x: (i) => i % 3 }, 10));
      assert.match(reasonOf(r, 'id'), /row identifier: each of the 10 rows has a different whole number/);
      assert.equal(kinds(r).w, 'numeric');
    });

    it('keeps whole numbers that repeat or have gaps in their uniqueness', async () => {
      const r = await loadCsvText(csv({ n: (i) => (i === 9 ? 0 : i), x: (i) => i % 3 }, 10));
      assert.equal(kinds(r).n, 'numeric');
    });

    it('drops a constant column, numeric or text, and one that is all missing', async () => {
      const r = await loadCsvText(csv({ k: () => 7, t: (i) => (i % 2 ? 'same' : 'NA'), e: () => '', x: (i) => i % 3 }, 6));
      assert.match(reasonOf(r, 'k'), /constant: every non-missing value is 7/);
      assert.match(reasonOf(r, 't'), /constant: every non-missing value is 'same'/);
      assert.match(reasonOf(r, 'e'), /empty: every one of the 6 cells is missing/);
      assert.deepEqual(r.table.columns.map((c) => c.name), ['x']);
    });

    it('drops text with more distinct values than the cap as free text, with the count', async () => {
      const text = csv({ word: (i) => `w${i % 30}`, x: (i) => i % 3 }, 90);
      const r = await loadCsvText(text, { maxLevels: 25 });
      assert.match(reasonOf(r, 'word'), /free text or identifier-like: 30 distinct values/);
      const kept = await loadCsvText(text, { maxLevels: 30 });
      assert.equal(kinds(kept).word, 'categorical');
    });

    it('counts distinct values exactly past the point where their text is no longer kept', async () => {
      // Far more values than 4 x the cap: the column is hashed, not coded, while streaming.
      const text = csv({ note: (i) => `note ${i % 700}`, tag: (i) => `t${i}`, x: (i) => i % 3 }, 2100);
      const r = await loadCsvText(text, { maxLevels: 10 });
      assert.match(reasonOf(r, 'note'), /free text or identifier-like: 700 distinct values/);
      assert.match(reasonOf(r, 'tag'), /row identifier: each of the 2,100 rows has a different value/);
    });

    it('uses the default cap of 1000 distinct values', async () => {
      const text = csv({ a: (i) => `a${i % 1001}`, b: (i) => `b${i % 1000}`, x: (i) => i % 3 }, 3003);
      const r = await loadCsvText(text);
      assert.match(reasonOf(r, 'a'), /1,001 distinct values/);
      assert.equal(kinds(r).b, 'categorical');
    });
  });

  describe('dates', () => {
    it('reads ISO dates and date-times as days since 1970-01-01, with a note', async () => {
      const r = await loadCsvText('d,t,x\n2024-03-01,2024-03-01T10:00,1\n2024-03-03,2024-03-01T16:00,2\n,2024-03-02T10:00,1\n');
      assert.deepEqual(numeric(r, 'd').slice(0, 2), [19783, 19785]); // Python: (date(2024,3,1) - date(1970,1,1)).days == 19783
      assert.ok(Number.isNaN(numeric(r, 'd')[2]));
      assert.ok(Math.abs(numeric(r, 't')[0] - (19783 + 10 / 24)) < 1e-9);
      assert.ok(r.notes.some((n) => /'d' holds ISO dates: read as days since 1970-01-01\./.test(n)));
      assert.ok(r.notes.some((n) => /'t' holds ISO dates: .*time of day as a fraction/.test(n)));
    });

    it('does not drop a daily series as an identifier, but does drop a constant date', async () => {
      const r = await loadCsvText(csv({ day: (i) => `2024-01-${String(i + 1).padStart(2, '0')}`, same: () => '2024-01-01', x: (i) => i % 3 }, 20));
      assert.equal(kinds(r).day, 'numeric');
      assert.match(reasonOf(r, 'same'), /constant/);
    });

    it('reads a column as text when some of its cells are not dates', async () => {
      const r = await loadCsvText('d,x\n2024-03-01,1\nsoon,2\n2024-03-01,1\n');
      assert.equal(kinds(r).d, 'categorical');
    });
  });

  describe('overrides', () => {
    it('forces categorical, keeping text exactly as written', async () => {
      const r = await loadCsvText('zip,x\n02134,1\n2134,2\n02134,1\n', { columnTypes: { zip: 'categorical' } });
      assert.deepEqual(texts(r, 'zip'), ['02134', '2134', '02134']);
    });

    it('forces numeric, turning all the text into missing with a warning', async () => {
      const r = await loadCsvText('v,x\n1,1\nlots,2\nnone,1\n4,2\n', { columnTypes: { v: 'numeric' } });
      assert.deepEqual(numeric(r, 'v').map((v) => (Number.isNaN(v) ? null : v)), [1, null, null, 4]);
      assert.match(r.warnings[0], /2 cells of text became missing \(the first on line 3: 'lots'\)/);
    });

    it('forces boolean on a 0/1 column, 0 first as false', async () => {
      const r = await loadCsvText('b,x\n1,1\n0,2\n1,1\n', { columnTypes: { b: 'boolean' } });
      const col = r.table.columns.find((c) => c.name === 'b');
      assert.ok(col && col.kind === 'boolean');
      assert.deepEqual(col.levels, ['0', '1']);
      assert.deepEqual(Array.from(col.codes), [1, 0, 1]);
    });

    it('forces boolean on any two values', async () => {
      const r = await loadCsvText('s,x\nM,1\nF,2\nM,1\n', { columnTypes: { s: 'boolean' } });
      assert.equal(kinds(r).s, 'boolean');
      assert.deepEqual(texts(r, 's'), ['M', 'F', 'M']);
    });

    it('keeps a forced column that the rules would drop, and excludes a column on request', async () => {
      const r = await loadCsvText(csv({ id: (i) => i, k: () => 3, x: (i) => i % 3 }, 5), { columnTypes: { id: 'numeric', k: 'categorical', x: 'exclude' } });
      assert.deepEqual(kinds(r), { id: 'numeric', k: 'categorical' });
      assert.match(reasonOf(r, 'x'), /excluded/);
    });

    it('warns about a type set for a column the file does not have', async () => {
      const r = await loadCsvText('a,b\n1,x\n2,y\n1,x\n', { columnTypes: { c: 'numeric' } }, 'f.csv');
      assert.deepEqual(r.warnings, ["f.csv has no column named 'c', so the type set for it was not used."]);
    });
  });

  describe('the target', () => {
    it('is never dropped as an identifier or as free text, and a numeric target stays numeric', async () => {
      const r = await loadCsvText(csv({ x: (i) => i % 3, y: (i) => i * 2 }, 10), { target: 'y' });
      assert.equal(kinds(r).y, 'numeric');
      const t = await loadCsvText(csv({ x: (i) => i % 3, label: (i) => `L${i}` }, 30), { target: 'label', maxLevels: 5 });
      assert.equal(kinds(t).label, 'categorical');
      assert.equal(texts(t, 'label').length, 30);
    });

    it('drops rows whose target is missing, with a note giving the count and first line', async () => {
      const r = await loadCsvText('x,y\n1,a\n2,\n1,b\n2,NA\n3,a\n', { target: 'y' }, 't.csv');
      assert.deepEqual(numeric(r, 'x'), [1, 1, 3]);
      assert.deepEqual(texts(r, 'y'), ['a', 'b', 'a']);
      assert.deepEqual(Array.from(r.table.lineOfRow), [2, 4, 6]);
      assert.deepEqual(Array.from(r.table.rowNumber!), [1, 3, 5], 'kept rows keep their data row numbers');
      assert.equal(r.rowsRead, 5);
      assert.ok(r.notes.includes("Dropped 2 rows whose target 'y' is missing (the first on line 3)."), JSON.stringify(r.notes));
    });

    it('drops rows whose numeric target is stray text, counting them with the missing ones', async () => {
      const text = csv({ x: (i) => i % 4, y: (i) => (i === 3 ? 'n/a?' : i === 5 ? '' : i * 1.5) }, 40);
      const r = await loadCsvText(text, { target: 'y' });
      assert.equal(r.table.rowCount, 38);
      assert.ok(!numeric(r, 'y').some(Number.isNaN));
      assert.ok(r.notes.some((n) => /Dropped 2 rows whose target 'y' is missing \(the first on line 5\)/.test(n)), JSON.stringify(r.notes));
      assert.equal(r.warnings.length, 1);
    });
  });
});
