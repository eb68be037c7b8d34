// Compressed text: a .csv.gz (or gzip under any name) loads to the same table as the plain file.
import * as assert from 'node:assert/strict';
import { gzipSync } from 'node:zlib';
import { loadCsv } from '../../../src/core/csv/load';
import { FixtureDir, assertUnchanged, loadError, snapshot } from './helpers';

function sampleCsv(rows: number, delimiter = ','): string {
  const lines = [['size', 'colour', 'flag', 'when', 'label'].join(delimiter)];
  for (let i = 0; i < rows; i++) {
    const size = i % 7 === 0 ? '' : ((i * 37) % 101) / 4;
    const colour = ['red', 'green', 'blue'][i % 3];
    const when = `2024-0${1 + (i % 9)}-1${i % 10}`;
    lines.push([size, colour, i % 2 === 0 ? 'yes' : 'no', when, i % 5 < 2 ? 'a' : 'b'].join(delimiter));
  }
  return lines.join('\n') + '\n';
}

describe('gzip-compressed text', () => {
  const dir = new FixtureDir();
  after(() => dir.remove());

  it('reads .csv.gz, .tsv.gz and gzip without the .gz name to the same table, notes and fingerprint as the plain file', async () => {
    const text = sampleCsv(3000);
    const plain = await loadCsv(dir.write('plain.csv', text), { target: 'label' });
    for (const [name, body] of [
      ['same.csv.gz', text],
      ['renamed.csv', text], // gzip by content, not by name
    ] as const) {
      const file = dir.write(name, gzipSync(body));
      const before = snapshot(file);
      const r = await loadCsv(file, { target: 'label' });
      assert.deepEqual(r.table, plain.table, name);
      assert.equal(r.format, 'gzip', `${name}: callers learn there are no editor lines to open`);
      assert.deepEqual(r.notes, plain.notes, name);
      assert.deepEqual(r.dropped, plain.dropped, name);
      assert.equal(r.fingerprint, plain.fingerprint, `${name}: the fingerprint is of the text, so a forest knows its training rows in either form`);
      assertUnchanged(file, before);
    }
    const tab = sampleCsv(3000, '\t');
    const tsvPlain = await loadCsv(dir.write('plain.tsv', tab), { target: 'label' });
    const tsv = await loadCsv(dir.write('same.tsv.gz', gzipSync(tab)), { target: 'label' });
    assert.equal(tsv.delimiter, '\t');
    assert.deepEqual(tsv.table, tsvPlain.table);
  });

  it('reads several gzip members one after another as one text', async () => {
    const text = sampleCsv(500);
    const cut = text.indexOf('\n', 4000) + 1;
    const file = dir.write('members.csv.gz', Buffer.concat([gzipSync(text.slice(0, cut)), gzipSync(text.slice(cut))]));
    const plain = await loadCsv(dir.write('members.csv', text));
    assert.deepEqual((await loadCsv(file)).table, plain.table);
  });

  it('places a CSV problem inside compressed text on its line, as for the plain file', async () => {
    const lines = sampleCsv(200).split('\n');
    lines[150] += ',extra';
    const file = dir.write('ragged.csv.gz', gzipSync(lines.join('\n')));
    await loadError(file, undefined, 'line 151 has 6 fields');
  });

  it('says a truncated or damaged gzip file is one, in one sentence naming the file', async () => {
    const zipped = gzipSync(sampleCsv(5000));
    await loadError(dir.write('cut.csv.gz', zipped.subarray(0, Math.floor(zipped.length / 2))), undefined, 'truncated');
    const damaged = Buffer.from(zipped);
    for (let i = 20; i < 60; i++) damaged[i] ^= 0x5a;
    await loadError(dir.write('bad.csv.gz', damaged), undefined, /not valid gzip|truncated/);
  });
});
