// The explanation thread's queue: what the user waits for goes before background filling, a request still
// waiting can be withdrawn, and a failed request does not stop the thread.
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import { loadCsv } from '../../src/core/csv/load';
import { fitForest } from '../../src/core/forest/fit';
import { encodeTable } from '../../src/core/forest/predict';
import type { Forest } from '../../src/core/forest/forest';
import { JobQueue } from '../../src/extension/workers/jobQueue';
import { ExplainClient } from '../../src/extension/workers/explainClient';
import { FIXTURES } from './helpers';

describe('explanation queue', () => {
  it('serves now before soon before idle, first come first served within each', () => {
    const q = new JobQueue<string>();
    q.push('i1', 'idle');
    q.push('s1', 'soon');
    q.push('n1', 'now');
    q.push('i2', 'idle');
    q.push('n2', 'now');
    assert.equal(q.size, 5);
    assert.deepEqual([q.shift(), q.shift(), q.shift(), q.shift(), q.shift(), q.shift()], ['n1', 'n2', 's1', 'i1', 'i2', undefined]);
  });

  it('raises a waiting item to the back of a more urgent lane, never lowers one, and removes on request', () => {
    const q = new JobQueue<string>();
    q.push('a', 'now');
    q.push('b', 'idle');
    q.push('c', 'idle');
    q.raise('c', 'now');
    q.raise('a', 'idle');
    assert.equal(q.find((x) => x === 'b'), 'b');
    assert.equal(q.remove('b'), true);
    assert.equal(q.remove('b'), false);
    assert.deepEqual(q.drain(), ['a', 'c']);
    assert.equal(q.size, 0);
  });
});

describe('explanation client (a real thread)', function () {
  this.timeout(120_000);
  let forest: Forest;
  let x: Float64Array;
  let client: ExplainClient;
  const p = 4;

  before(async () => {
    const load = await loadCsv(path.join(FIXTURES, 'iris.csv'));
    forest = (await fitForest(load.table, { target: 'species', params: { trees: 30, seed: 2 }, workers: 2 })).forest;
    x = encodeTable(forest.schema, load.table);
    client = new ExplainClient({ forest, trainX: x, trainCount: 150, quantiles: null });
  });
  after(async () => client?.dispose());

  const row = (r: number) => x.slice(r * p, r * p + p);

  it('answers an urgent request before background requests queued earlier', async () => {
    const done: string[] = [];
    const idle = Array.from({ length: 6 }, (_, i) =>
      client.run({ kind: 'contributions', x: row(i), rows: 1 }, 'idle').then(() => done.push(`idle${i}`)),
    );
    const urgent = client.run({ kind: 'contributions', x: row(100), rows: 1 }, 'now').then(() => done.push('now'));
    await Promise.all([...idle, urgent]);
    // The first idle request was already on the thread; the urgent one goes next.
    assert.deepEqual(done, ['idle0', 'now', 'idle1', 'idle2', 'idle3', 'idle4', 'idle5']);
  });

  it('withdraws a request that has not started, and still answers the others', async () => {
    const first = client.run({ kind: 'contributions', x: row(1), rows: 1 }, 'now');
    const abort = new AbortController();
    const withdrawn = client.run({ kind: 'contributions', x: row(2), rows: 1 }, 'idle', abort.signal);
    abort.abort();
    await assert.rejects(withdrawn, { name: 'AbortError' });
    const c = await first;
    assert.equal(c.values.length, p * 3);
    await assert.rejects(client.run({ kind: 'contributions', x: row(3), rows: 1 }, 'now', abort.signal), { name: 'AbortError' });
  });

  it('passes a request’s own error back with its name and keeps serving', async () => {
    await assert.rejects(
      client.run({ kind: 'dependence', feature: 9, gridSize: 10, spacing: 'even', sampleRows: 10, seed: 1 }, 'now'),
      (e: Error) => e.name === 'RangeError' && /outside 0\.\.3/.test(e.message),
    );
    const d = await client.run({ kind: 'dependence', feature: 2, gridSize: 10, spacing: 'even', sampleRows: 10, seed: 1 }, 'now');
    assert.equal(d.iceRows.length, 10);
    const i = await client.run({ kind: 'intervals', x: row(0), rows: 1, level: 0.9 }, 'now');
    assert.deepEqual(i, { unavailable: 'intervals are for regression forests.' });
  });

  it('rejects everything once disposed', async () => {
    const other = new ExplainClient({ forest, trainX: x, trainCount: 150, quantiles: null });
    const pending = assert.rejects(other.run({ kind: 'contributions', x: row(0), rows: 1 }, 'idle'), /closed/);
    const queued = assert.rejects(other.run({ kind: 'contributions', x: row(1), rows: 1 }, 'idle'), /closed/);
    await other.dispose();
    await Promise.all([pending, queued]);
    await assert.rejects(other.run({ kind: 'contributions', x: row(0), rows: 1 }, 'now'), /closed/);
  });
});
