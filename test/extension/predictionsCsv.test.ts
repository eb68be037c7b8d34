// "Predict into a new CSV": input records copied exactly, prediction columns appended.
import * as assert from 'node:assert/strict';
import { csvField, predictionsCsv, uniqueNames } from '../../src/extension/predict/predictionsCsv';

describe('extension predictions file', () => {
  it('copies every record verbatim, quoted line breaks and all, and appends the new cells', () => {
    const text = 'id,note,y\n1,"two\nlines",a\n2,"say ""x""",b\n';
    const out = predictionsCsv(text, Int32Array.from([2, 4]), ',', [
      { name: 'predicted_y', cells: ['a', 'a'] },
      { name: 'probability_a', cells: ['0.9', '0.51'] },
    ]);
    assert.equal(out, 'id,note,y,predicted_y,probability_a\n1,"two\nlines",a,a,0.9\n2,"say ""x""",b,a,0.51\n');
  });

  it('keeps CRLF line ends and a semicolon delimiter', () => {
    const text = 'a;b\r\n1;2\r\n3;4\r\n';
    const out = predictionsCsv(text, Int32Array.from([2, 3]), ';', [{ name: 'p', cells: ['x;y', 'z'] }]);
    assert.equal(out, 'a;b;p\r\n1;2;"x;y"\r\n3;4;z\r\n');
  });

  it('keeps old Mac CR-only line ends, which core also reads', () => {
    const out = predictionsCsv('a,b\r1,"x\ry"\r2,z\r', Int32Array.from([2, 4]), ',', [{ name: 'p', cells: ['u', 'v'] }]);
    assert.equal(out, 'a,b,p\r1,"x\ry",u\r2,z,v\r');
  });

  it('writes rows in file order even when the table held them in another', () => {
    const out = predictionsCsv('h\n1\n2\n3\n', Int32Array.from([4, 2, 3]), ',', [{ name: 'p', cells: ['c', 'a', 'b'] }]);
    assert.equal(out, 'h,p\n1,a\n2,b\n3,c\n');
  });

  it('quotes fields as RFC 4180 requires (delimiter, quote, line break)', () => {
    assert.equal(csvField('plain', ','), 'plain');
    assert.equal(csvField('a,b', ','), '"a,b"');
    assert.equal(csvField('say "hi"', ','), '"say ""hi"""');
    assert.equal(csvField('x\ny', ','), '"x\ny"');
    assert.equal(csvField('a,b', ';'), 'a,b');
  });

  it('never reuses one of the file\'s own column names', () => {
    assert.deepEqual(uniqueNames(['predicted_y', 'p'], ['predicted_y', 'predicted_y_2', 'x']), ['predicted_y_3', 'p']);
  });
});
