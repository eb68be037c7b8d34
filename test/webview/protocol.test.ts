// The shared protocol's guards: what the host builds passes, what would break the other end fails.
import * as assert from 'node:assert/strict';
import {
  axisSpan,
  cellCentre,
  isHostToPanel,
  isPanelState,
  isPanelToHost,
  PROTOCOL_VERSION,
  type HostMessage,
  type HostToPanel,
  type PanelState,
  type PanelToHost,
} from '../../src/protocol/messages';
import {
  classificationMap,
  classificationMessages,
  classificationSummary,
  contributionsMessage,
  dependenceLevels,
  dependenceNumeric,
  globalMessage,
  regressionMap,
  regressionSummary,
  rowVotes,
  stamp,
  sweepDone,
  SUSPECTS,
} from './fixtures';

const clone = <T>(x: T): T => JSON.parse(JSON.stringify(x)) as T;

describe('protocol guards', () => {
  it('accepts every message the fixtures build, and they survive JSON unchanged (plain data only)', () => {
    const all: HostToPanel[] = [
      ...classificationMessages(),
      { type: 'summary', summary: regressionSummary() },
      { type: 'regionMap', map: regressionMap() },
      { type: 'highlight', rows: [3, 9] },
      { type: 'status', state: 'working', text: 'fitting', progress: 0.4 },
    ].map((m) => stamp(m as HostMessage));
    // A status line may belong to no fit (say, before the first one).
    all.push({ type: 'status', state: 'error', text: 'no CSV', progress: null, fit: null });
    for (const m of all) {
      assert.ok(isHostToPanel(m), m.type);
      assert.deepEqual(clone(m), m, `${m.type} is not plain JSON data`);
    }
  });

  it('rejects host messages the panel could not draw', () => {
    const map = classificationMap(4, 3);
    const bad: unknown[] = [
      null,
      { type: 'nope' },
      { type: 'summary' },
      { type: 'summary', summary: { ...classificationSummary(), task: 'clustering' } },
      // JSON turns NaN into null; a strength must be a number.
      { type: 'regionMap', map: clone({ ...map, cells: { ...map.cells, strength: [Number.NaN, ...(map.cells.task === 'classification' ? map.cells.strength.slice(1) : [])] } }) },
      { type: 'regionMap', map: { ...map, nx: 5 } },
      { type: 'regionMap', map: { ...map, x: { feature: 'c', kind: 'categorical', levels: ['a', 'b'] } } },
      { type: 'regionMap', map: { ...map, x: { feature: 'a', kind: 'numeric', min: 2, max: 2 } } },
      { type: 'regionMap', map: { ...map, points: { x: [1], y: [], target: [0], row: [1], total: 1 } } },
      // A typed array is not plain data: postMessage to a webview would not keep it.
      { type: 'disagreement', rows: [{ row: 1, counts: [1], lead: 'all-trees', allPredicted: 0, agreement: 1, entropy: 0, oobVote: 0, label: 0, votes: new Float64Array([0]), outOfBag: [] }], selected: 1 },
      { type: 'suspects', rows: [{ ...SUSPECTS[0], row: 0 }] },
      { type: 'highlight', rows: [1.5] },
      { type: 'status', state: 'busy', text: '', progress: null },
    ];
    for (const m of bad) assert.equal(isHostToPanel(m === null ? m : { ...(m as object), fit: 'flowers-fit-1' }), false, JSON.stringify(m)?.slice(0, 120));
    // Every message names its fit, and a summary names the same fit it carries.
    assert.equal(isHostToPanel({ type: 'regionMap', map }), false);
    assert.equal(isHostToPanel({ type: 'regionMap', map, fit: null }), false);
    assert.equal(isHostToPanel(stamp({ type: 'regionMap', map })), true);
    assert.equal(isHostToPanel({ type: 'summary', summary: classificationSummary(), fit: 'another' }), false);
  });

  it('accepts the panel messages and rejects malformed ones', () => {
    const good: PanelToHost[] = [
      { type: 'ready', version: 1 },
      { type: 'ready', version: 1, choice: null },
      { type: 'ready', version: 1, choice: { x: 'a', y: 'b', reference: { mode: 'row', row: 3 } } },
      { type: 'chooseMap', x: 'a', y: 'b', reference: { mode: 'typical' } },
      { type: 'chooseMap', x: 'a', y: 'b', reference: { mode: 'row', row: 12 } },
      { type: 'chooseMap', x: 'a', y: 'b', reference: { mode: 'averaged' } },
      { type: 'openMap', x: 'a', y: 'b' },
      { type: 'revealRow', row: 1 },
      { type: 'refit', leaveOut: ['id'], trees: 200 },
      { type: 'refit', leaveOut: [], trees: null },
    ];
    for (const m of good) assert.ok(isPanelToHost(m), JSON.stringify(m));
    const bad: unknown[] = [
      { type: 'ready' },
      { type: 'ready', version: 1, choice: { x: 'a', reference: { mode: 'typical' } } },
      { type: 'chooseMap', x: 'a', y: 'b', reference: { mode: 'row' } },
      { type: 'chooseMap', x: 'a', y: 'b', reference: { mode: 'medians' } },
      { type: 'revealRow', row: 0 },
      { type: 'revealRow', row: '3' },
      { type: 'refit', leaveOut: [], trees: 0 },
      { type: 'summary', summary: classificationSummary() },
    ];
    for (const m of bad) assert.equal(isPanelToHost(m), false, JSON.stringify(m));
  });

  it('accepts the explanation messages the fixtures build, as plain data', () => {
    const all: HostToPanel[] = (
      [
      contributionsMessage(),
      { type: 'contributions', row: 3, state: 'working', contributions: null, text: 'Working…' },
      { type: 'contributions', row: null, state: 'unavailable', contributions: null, text: 'Not here.' },
      globalMessage(40, false),
      { type: 'globalContributions', global: null, text: 'Working…' },
      dependenceNumeric(),
      dependenceLevels(),
      sweepDone(2),
      { type: 'sweep', state: 'running', progress: 0.5, text: '', result: null },
      { type: 'sweep', state: 'cancelled', progress: null, text: 'Sweep cancelled.', result: null },
      { type: 'disagreement', rows: [{ ...rowVotes(4, 0, 0.1), interval: { level: 0.9, lower: 1, upper: 2 } }], selected: 1 },
      ] as HostMessage[]
    ).map((m) => stamp(m));
    for (const m of all) {
      assert.ok(isHostToPanel(m), `${m.type} ${JSON.stringify(m).slice(0, 80)}`);
      assert.deepEqual(clone(m), m, `${m.type} is not plain JSON data`);
    }
  });

  it('rejects explanation messages the panel could not draw', () => {
    const c = contributionsMessage();
    const d = dependenceNumeric().dependence;
    const sweep = sweepDone(2).result!;
    const bad: unknown[] = [
      { ...c, contributions: null },
      { ...c, row: 72 },
      { ...c, state: 'working' },
      { ...c, contributions: { ...c.contributions!, output: -1 } },
      // JSON would turn a NaN contribution into null.
      { ...c, contributions: { ...c.contributions!, features: [{ feature: 'a', value: '1', contribution: null }] } },
      { type: 'globalContributions', global: { ...globalMessage(1, true).global!, features: [{ feature: 'a', meanAbs: -1 }] }, text: '' },
      { type: 'dependence', dependence: { ...d, average: d.average.slice(1) } },
      { type: 'dependence', dependence: { ...d, grid: [...d.grid.slice(0, -1), 0] } },
      { type: 'dependence', dependence: { ...d, ice: [d.ice[0].slice(1)], iceRows: [1] } },
      { type: 'dependence', dependence: { ...d, iceRows: [1] } },
      { type: 'dependence', dependence: { ...d, boundaries: [] } },
      { type: 'dependence', dependence: { ...d, labels: ['a'] } },
      { type: 'dependence', dependence: { ...dependenceLevels().dependence, labels: null } },
      { type: 'sweep', state: 'done', progress: null, text: '', result: null },
      { type: 'sweep', state: 'done', progress: null, text: '', result: { ...sweep, points: [] } },
      { type: 'sweep', state: 'busy', progress: null, text: '', result: null },
      { type: 'disagreement', rows: [{ ...rowVotes(4, 0, 0.1), interval: { level: 0.9, lower: 3, upper: 2 } }], selected: 1 },
      { type: 'disagreement', rows: [{ ...rowVotes(4, 0, 0.1), interval: { level: 90, lower: 1, upper: 2 } }], selected: 1 },
      // Fewer rows selected than listed cannot be.
      { type: 'disagreement', rows: [rowVotes(4, 0, 0.1), rowVotes(5, 0, 0.1)], selected: 1 },
    ];
    for (const m of bad) assert.equal(isHostToPanel({ ...(m as object), fit: 'flowers-fit-1' }), false, JSON.stringify(m)?.slice(0, 160));
  });

  it('accepts the panel’s explanation requests and rejects malformed ones', () => {
    const good: PanelToHost[] = [
      { type: 'explainRow', row: 7 },
      { type: 'chooseDependence', feature: 'a', output: null },
      { type: 'chooseDependence', feature: 'a', output: 2 },
      { type: 'runSweep' },
      { type: 'cancelSweep' },
      { type: 'sweepRefit', featuresPerSplit: 3 },
    ];
    for (const m of good) assert.ok(isPanelToHost(m), JSON.stringify(m));
    const bad: unknown[] = [
      { type: 'explainRow', row: 0 },
      { type: 'explainRow' },
      { type: 'chooseDependence', feature: 3, output: null },
      { type: 'chooseDependence', feature: 'a', output: -1 },
      { type: 'chooseDependence', feature: 'a' },
      { type: 'sweepRefit', featuresPerSplit: 0 },
      { type: 'sweepRefit', featuresPerSplit: 2.5 },
    ];
    for (const m of bad) assert.equal(isPanelToHost(m), false, JSON.stringify(m));
  });

  it('checks the saved panel state before the panel trusts it', () => {
    const state: PanelState = {
      version: PROTOCOL_VERSION,
      fit: 'flowers-fit-1',
      summary: classificationSummary(),
      map: classificationMap(6, 5),
      matrix: [],
      suspects: SUSPECTS,
      choice: { x: 'petal_len', y: 'petal_wid', reference: { mode: 'typical' } },
    };
    assert.ok(isPanelState(clone(state)));
    assert.equal(isPanelState({ ...state, map: { nx: 1 } }), false);
    assert.equal(isPanelState(undefined), false);
  });

  it('places grid cells at the centres of equal slices, and level cells on their codes', () => {
    const axis = { feature: 'a', kind: 'numeric' as const, min: 0, max: 10 };
    assert.deepEqual([0, 1, 4].map((i) => cellCentre(axis, 5, i)), [1, 3, 9]);
    const levels = { feature: 'c', kind: 'categorical' as const, levels: ['x', 'y', 'z'] };
    assert.deepEqual([0, 2].map((i) => cellCentre(levels, 3, i)), [0, 2]);
    assert.deepEqual(axisSpan(levels), { min: -0.5, max: 2.5 });
    assert.deepEqual(axisSpan(axis), { min: 0, max: 10 });
  });
});
