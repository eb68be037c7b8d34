import * as assert from 'node:assert/strict';
import { fieldCounts, sniffDelimiter } from '../../../src/core/csv/sniff';

const bytes = (s: string) => Buffer.from(s, 'utf8');

describe('csv delimiter sniffing', () => {
  for (const [name, d] of [['comma', ','], ['semicolon', ';'], ['tab', '\t'], ['pipe', '|']] as const) {
    it(`finds the ${name}`, () => {
      const text = ['a', 'b', 'c'].join(d) + '\n' + ['1', '2', '3'].join(d) + '\n' + ['4', '5', '6'].join(d) + '\n';
      assert.equal(sniffDelimiter(bytes(text), true), d);
    });
  }

  it('ignores delimiters inside quotes (RFC 4180 section 2, rules 5-7)', () => {
    // Commas only inside quoted fields; the semicolon is the real delimiter.
    const text = 'name;note\n"Smith, J";"a, b, c"\n"Doe, A";"x, y"\n';
    assert.equal(sniffDelimiter(bytes(text), true), ';');
    assert.deepEqual(fieldCounts(bytes(text), ';'.charCodeAt(0), true), [2, 2, 2]);
  });

  it('counts a quoted line break as part of its field (RFC 4180 section 2, rule 6)', () => {
    const text = 'a,b\n"line one\nline two",2\n3,4\n';
    assert.deepEqual(fieldCounts(bytes(text), 44, true), [2, 2, 2]);
  });

  it('prefers the candidate that splits every row like the header over one that is merely frequent', () => {
    // Decimal commas (common practice in semicolon files) vary per row; the semicolon count does not.
    const text = 'x;y\n1,5;2\n3;4,25\n5,125;6\n';
    assert.equal(sniffDelimiter(bytes(text), true), ';');
  });

  it('falls back to a comma for a one-column file', () => {
    assert.equal(sniffDelimiter(bytes('value\n1\n2\n'), true), ',');
  });

  it('skips a UTF-8 byte-order mark and blank lines', () => {
    assert.deepEqual(fieldCounts(bytes('\ufeffa|b\n\n1|2\n'), '|'.charCodeAt(0), true), [2, 2]);
  });

  it('leaves out a last row the sample may have cut short', () => {
    assert.deepEqual(fieldCounts(bytes('a,b,c\n1,2,3\n4,5'), 44, false), [3, 3]);
    assert.deepEqual(fieldCounts(bytes('a,b,c\n1,2,3\n4,5'), 44, true), [3, 3, 2]);
  });
});
