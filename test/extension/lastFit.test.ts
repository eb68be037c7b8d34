// Keeping the last fit across a window reload, and bringing it back from storage and the CSV.
import * as assert from 'node:assert/strict';
import { promises as fs } from 'node:fs';
import * as os from 'node:os';
import * as path from 'node:path';
import { inBagCounts } from '../../src/core/forest/bootstrap';
import { Scorer } from '../../src/core/forest/scorer';
import { fromBase64, loadLastFit, saveLastFit, toBase64, type LastFitMeta } from '../../src/extension/session/lastFit';
import { restoreLastFit } from '../../src/extension/session/restore';
import { choicesFrom } from '../../src/extension/fit/choices';
import { readSettings } from '../../src/extension/settings';
import { FIXTURES, fitFixture, type Fitted } from './helpers';

describe('extension last fit', () => {
  let dir: string;
  let csv: string;
  let f: Fitted;
  before(async () => {
    dir = await fs.mkdtemp(path.join(os.tmpdir(), 'copse-lastfit-'));
    csv = path.join(dir, 'wine.csv');
    await fs.copyFile(path.join(FIXTURES, 'wine.csv'), csv);
    f = await fitFixture(csv, 'cultivar', { trees: 20, seed: 4 });
    const choices = choicesFrom(readSettings({ get: () => undefined }).settings.training, 'cultivar', 'classification');
    await saveLastFit(
      path.join(dir, 'store'),
      { forest: f.report.forest, trainRows: f.report.trainRows },
      { csv: { path: csv, sampled: false, bytes: 0 }, fingerprint: f.load.fingerprint, summary: f.session.summary, choices },
    );
  });
  after(async () => {
    await f?.session.dispose();
    await fs.rm(dir, { recursive: true, force: true });
  });

  it('round-trips row indices through base64', () => {
    const a = Int32Array.from([0, 5, 2 ** 31 - 1, -1]);
    assert.deepEqual(Array.from(fromBase64(toBase64(a))), Array.from(a));
    assert.deepEqual(Array.from(fromBase64(toBase64(a.subarray(1, 3)))), [5, 2 ** 31 - 1]);
  });

  it('restores the forest with the same per-row out-of-bag votes, margins and suspects', async () => {
    const restored = (await restoreLastFit(path.join(dir, 'store'), (forest) => new Scorer(forest)))!;
    try {
      assert.equal(restored.note, undefined);
      assert.ok(restored.origin, 'a restored fit can be refitted from the panel');
      const s = restored.session;
      // The same summary, stamped with the restored session's own id so the panel treats it as a fit of its own.
      assert.deepEqual({ ...s.summary, fit: '' }, { ...f.session.summary, fit: '' });
      assert.notEqual(s.summary.fit, f.session.summary.fit);
      for (const r of [0, 17, 100, 177]) {
        const a = s.store.answer(r);
        const b = f.session.store.answer(r);
        assert.deepEqual(a.oob, b.oob);
        assert.equal(a.margin, b.margin, 'margins recomputed from votes equal core\'s');
        assert.deepEqual(a.all, b.all);
      }
      assert.deepEqual(s.suspects(50), f.session.suspects(50));
    } finally {
      await restored.session.dispose();
    }
  });

  it('comes back without out-of-bag votes, and says so, when the CSV changed since', async () => {
    const store2 = path.join(dir, 'store2');
    await fs.cp(path.join(dir, 'store'), store2, { recursive: true });
    const meta = JSON.parse(await fs.readFile(path.join(store2, 'meta.json'), 'utf8')) as LastFitMeta;
    const changed = path.join(dir, 'wine-changed.csv');
    const text = await fs.readFile(csv, 'utf8');
    await fs.writeFile(changed, text.replace(/\n([^\n]+)\n$/, '\n$1\n$1\n'));
    await fs.writeFile(path.join(store2, 'meta.json'), JSON.stringify({ ...meta, csv: { ...meta.csv, path: changed } }));
    const restored = (await restoreLastFit(store2, (forest) => new Scorer(forest)))!;
    try {
      assert.match(restored.note ?? '', /has changed since this forest was fitted/);
      assert.equal(restored.origin, undefined);
      assert.equal(restored.session.store.answer(0).oob, undefined);
      assert.equal(restored.session.store.answer(0).role, 'scored');
      assert.match(restored.session.summary.warnings[0], /has changed/);
    } finally {
      await restored.session.dispose();
    }
  });

  it('finds nothing, rather than a half set, when the storage is empty or damaged', async () => {
    assert.equal(await loadLastFit(path.join(dir, 'nowhere')), undefined);
    const broken = path.join(dir, 'broken');
    await fs.cp(path.join(dir, 'store'), broken, { recursive: true });
    const meta = JSON.parse(await fs.readFile(path.join(broken, 'meta.json'), 'utf8')) as LastFitMeta;
    await fs.writeFile(path.join(broken, 'meta.json'), JSON.stringify({ ...meta, trees: meta.trees - 1 }));
    assert.equal(await loadLastFit(broken), undefined, 'a model that is not the one the meta describes');
    await fs.writeFile(path.join(broken, 'meta.json'), JSON.stringify({ ...meta, version: 1 }));
    assert.equal(await loadLastFit(broken), undefined, 'an older layout');
  });

  it('finishes one save before the next starts, so the last fit saved is the one that comes back', async () => {
    const store = path.join(dir, 'store3');
    const g = await fitFixture(csv, 'cultivar', { trees: 7, seed: 5 });
    try {
      const meta = { csv: { path: csv, sampled: false, bytes: 0 }, fingerprint: f.load.fingerprint, summary: f.session.summary };
      await Promise.all([
        saveLastFit(store, { forest: f.report.forest, trainRows: f.report.trainRows }, meta),
        saveLastFit(store, { forest: g.report.forest, trainRows: g.report.trainRows }, meta),
      ]);
      const back = (await loadLastFit(store))!;
      assert.equal(back.forest.trees.length, 7);
      assert.deepEqual(back.inBag, inBagCounts(g.report.forest.params, 7, g.report.trainRows.length));
    } finally {
      await g.session.dispose();
    }
  });
});
