// What the target picker says about each column.
import * as assert from 'node:assert/strict';
import { loadCsvText } from '../../src/core/csv/load';
import { describeProfile, profileColumns, taskAllowed } from '../../src/extension/fit/columnProfile';

describe('extension column profiles', () => {
  it('reports kind, distinct values, missing share and the task a fit would infer', async () => {
    const rows = ['id,size,colour,grade,score'];
    for (let i = 1; i <= 20; i++) rows.push(`${i},${i % 5 === 0 ? '' : i * 1.5},${['red', 'blue'][i % 2]},${i % 3},${i / 7}`);
    const load = await loadCsvText(rows.join('\n') + '\n', {}, 'p.csv');
    const p = profileColumns(load.table, load.header, load.dropped);
    assert.deepEqual(p.map((x) => x.name), ['id', 'size', 'colour', 'grade', 'score'], 'header order, dropped columns included');
    assert.match(p[0].dropped ?? '', /identifier/);
    assert.match(describeProfile(p[0]), /^left out when reading: /);
    assert.equal(describeProfile(p[1]), 'numeric · 16 distinct · 20.0% missing · fits as regression');
    assert.equal(describeProfile(p[2]), 'categorical · 2 distinct · 0.0% missing · fits as classification');
    // A few distinct whole numbers read as classes (core's inferTask: at most 10 integer values).
    assert.equal(p[3].task, 'classification');
    assert.equal(p[4].task, 'regression');
    assert.equal(taskAllowed(p[2], 'regression'), false, 'text cannot be a regression target');
    assert.equal(taskAllowed(p[3], 'regression'), true);
  });
});
