// Loading on a worker thread must give exactly what loading in-process gives, errors included.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../../src/core/csv/load';
import { loadCsvOffThread, loadCsvTextOffThread } from '../../../src/core/csv/load-off-thread';
import { DataError } from '../../../src/core/csv/types';

const kites = path.join(__dirname, '..', '..', '..', '..', 'demo', 'kite-flights.csv');

describe('csv loading off the calling thread', () => {
  it('returns the same result as loadCsv', async () => {
    const [a, b] = await Promise.all([loadCsvOffThread(kites, { target: 'outcome' }), loadCsv(kites, { target: 'outcome' })]);
    assert.deepEqual(a, b);
  });

  it('rejects bad input with the same DataError sentence', async () => {
    await assert.rejects(loadCsvTextOffThread('a,b\n1,2\n3\n', {}, 'bad.csv'), (e: Error) => e instanceof DataError && /^bad\.csv line 3 has 1 field/.test(e.message));
  });

  it('stops when cancelled', async () => {
    const c = new AbortController();
    const run = loadCsvOffThread(kites, { signal: c.signal });
    c.abort();
    await assert.rejects(run, (e: Error) => e.name === 'AbortError');
  });
});
