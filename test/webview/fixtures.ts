// Hand-made host messages for the panel tests: an invented three-class flower scenario whose
// decision regions follow a rule the tests know, so pixels can be checked against it. Names carry
// markup on purpose: the panel must show them as text.
import {
  cellCentre,
  type FitSummary,
  type HostMessage,
  type HostToPanel,
  type NumericAxis,
  type RegionMap,
  type RowVotes,
  type SuspectRow,
} from '../../src/protocol/messages';

export const HOSTILE_FEATURE = '<img src=x onerror="window.__injected=1">';
export const HOSTILE_DROPPED = '<script>window.__injected=2</script>';
export const HOSTILE_CLASS = '<b>virginica</b>';
export const HOSTILE_LEVEL = '<i>green</i>';
export const CLASSES = ['setosa', 'versicolor', HOSTILE_CLASS];
export const TREES = 60;

/** A host message as the host sends it: named with its fit (a summary's own, otherwise the flower fit's). */
export function stamp(m: HostMessage, fit: string | null = 'flowers-fit-1'): HostToPanel {
  return { ...m, fit: m.type === 'summary' ? m.summary.fit : fit };
}

/** The rule the invented map follows: class by region, strength falling near the boundaries. */
export function regionTruth(x: number, y: number): { k: number; s: number } {
  const dx = x - 2.5;
  const dy = y - 1.6;
  const k = dx < 0 ? 0 : dy < 0 ? 1 : 2;
  const d = dx < 0 ? -dx : Math.min(dx, Math.abs(dy) * 3);
  return { k, s: Math.min(1, 0.4 + d / 1.2) };
}

function rng(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    return s / 4294967296;
  };
}

export function classificationSummary(): FitSummary {
  const curve: Array<number | null> = [null, null];
  for (let t = 3; t <= TREES; t++) curve.push(0.066 + 0.25 * Math.exp(-t / 6));
  return {
    fit: 'flowers-fit-1',
    dataset: { label: 'flowers <u>2024</u>.csv', uri: 'file:///work/demo/flowers.csv' },
    target: 'species',
    task: 'classification',
    classes: CLASSES,
    trees: TREES,
    rowsUsed: 150,
    rowsRead: 152,
    sampled: false,
    features: [
      { name: 'petal_len', kind: 'numeric' },
      { name: 'petal_wid', kind: 'numeric' },
      { name: HOSTILE_FEATURE, kind: 'numeric' },
      { name: 'colour', kind: 'categorical' },
    ],
    dropped: [
      { name: 'id', reason: 'every value distinct: looks like an identifier' },
      { name: HOSTILE_DROPPED, reason: 'same value in every row' },
    ],
    oob: {
      kind: 'classification',
      rows: 150,
      accuracy: 140 / 150,
      balancedAccuracy: 0.9333,
      logLoss: 0.187,
      perClass: [
        { label: 'setosa', precision: 1, recall: 1, support: 50 },
        { label: 'versicolor', precision: 0.898, recall: 0.88, support: 50 },
        { label: HOSTILE_CLASS, precision: 0.902, recall: 0.92, support: 50 },
      ],
      confusion: [
        [50, 0, 0],
        [0, 44, 6],
        [0, 4, 46],
      ],
    },
    heldOut: {
      from: 'holdout',
      scores: {
        kind: 'classification',
        rows: 30,
        accuracy: 0.9,
        balancedAccuracy: 0.9,
        logLoss: 0.25,
        perClass: [],
        confusion: [
          [10, 0, 0],
          [0, 9, 1],
          [0, 2, 8],
        ],
      },
    },
    curve,
    importance: [
      { feature: 'petal_len', impurity: 0.44, permutation: 0.28, permutationSpread: 0.03 },
      { feature: 'petal_wid', impurity: 0.41, permutation: 0.22, permutationSpread: 0.025 },
      { feature: HOSTILE_FEATURE, impurity: 0.1, permutation: 0.01, permutationSpread: 0.012 },
      { feature: 'colour', impurity: 0.05, permutation: -0.004, permutationSpread: 0.006 },
    ],
    warnings: ['2 rows had no species and were left out (first at line 40).', 'Column <iframe src="x"> had 3 non-numeric cells; read as missing.'],
    fitSeconds: 0.42,
    suspectCount: 3,
  };
}

export const X_AXIS: NumericAxis = { feature: 'petal_len', kind: 'numeric', min: 1, max: 7 };
export const Y_AXIS: NumericAxis = { feature: 'petal_wid', kind: 'numeric', min: 0, max: 2.5 };

export function classificationMap(nx = 48, ny = 40): RegionMap {
  const predicted: number[] = [];
  const strength: number[] = [];
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const t = regionTruth(cellCentre(X_AXIS, nx, i), cellCentre(Y_AXIS, ny, j));
      predicted.push(t.k);
      strength.push(t.s);
    }
  }
  const r = rng(7);
  const x: number[] = [];
  const y: number[] = [];
  const target: number[] = [];
  const row: number[] = [];
  for (let n = 0; n < 150; n++) {
    const k = n % 3;
    const px = k === 0 ? 1.2 + r() * 1.0 : 3 + r() * 3.8;
    const py = k === 0 ? 0.1 + r() * 0.5 : k === 1 ? 0.9 + r() * 0.9 : 1.4 + r() * 1.0;
    x.push(px);
    y.push(py);
    target.push(k);
    row.push(n + 1);
  }
  return {
    x: X_AXIS,
    y: Y_AXIS,
    nx,
    ny,
    cells: { task: 'classification', predicted, strength },
    reference: { mode: 'typical' },
    heldAt: [
      { feature: HOSTILE_FEATURE, value: '3.1' },
      { feature: 'colour', value: HOSTILE_LEVEL },
    ],
    points: { x, y, target, row, total: 150 },
  };
}

export function smallMaps(): RegionMap[] {
  const levelMap: RegionMap = {
    x: X_AXIS,
    y: { feature: 'colour', kind: 'categorical', levels: ['red', HOSTILE_LEVEL, 'blue'] },
    nx: 20,
    ny: 3,
    cells: {
      task: 'classification',
      predicted: Array.from({ length: 60 }, (_, c) => regionTruth(cellCentre(X_AXIS, 20, c % 20), 1 + Math.floor(c / 20) * 0.5).k),
      strength: Array.from({ length: 60 }, () => 0.8),
    },
    reference: { mode: 'typical' },
    heldAt: [],
    points: null,
  };
  const third: RegionMap = { ...classificationMap(24, 20), x: { feature: HOSTILE_FEATURE, kind: 'numeric', min: 0, max: 5 }, points: null };
  return [{ ...classificationMap(24, 20), points: null }, levelMap, third];
}

/** Tree t votes for row r; a few trees disagree so the strip shows a split. */
export function rowVotes(row: number, label: number, spread: number): RowVotes {
  const r = rng(row);
  const votes: number[] = [];
  for (let t = 0; t < TREES; t++) votes.push(r() < spread ? (label + 1 + Math.floor(r() * 2)) % 3 : label);
  const counts = [0, 0, 0];
  for (const v of votes) counts[v]++;
  const shares = counts.map((c) => c / TREES);
  const entropy = -shares.filter((p) => p > 0).reduce((a, p) => a + p * Math.log2(p), 0);
  const top = counts.indexOf(Math.max(...counts));
  const outOfBag = votes.map((_, t) => t).filter((t) => t % 3 === 1);
  const oobCounts = [0, 0, 0];
  for (const t of outOfBag) oobCounts[votes[t]]++;
  return {
    row,
    counts,
    lead: 'out-of-bag',
    allPredicted: top,
    agreement: counts[top] / TREES,
    entropy,
    oobVote: oobCounts.indexOf(Math.max(...oobCounts)),
    label,
    votes,
    outOfBag,
  };
}

export const SUSPECTS: SuspectRow[] = [
  { row: 71, score: -0.62, label: 1, oobPredicted: 2 },
  { row: 84, score: -0.41, label: 1, oobPredicted: 2 },
  { row: 120, score: -0.2, label: 2, oobPredicted: 1 },
];

export function classificationMessages(): HostMessage[] {
  return [
    { type: 'summary', summary: classificationSummary() },
    { type: 'regionMap', map: classificationMap() },
    { type: 'mapMatrix', maps: smallMaps() },
    { type: 'suspects', rows: SUSPECTS },
    { type: 'disagreement', rows: [rowVotes(71, 1, 0.45), rowVotes(12, 0, 0.05)], selected: 2 },
    { type: 'status', state: 'idle', text: 'Fitted 60 trees on 150 rows.', progress: null },
  ];
}

// ---------------------------------------------------------------------------------------------
// A regression scenario: invented house prices rising with floor area and falling with distance.

export function regressionSummary(): FitSummary {
  const curve: Array<number | null> = [null];
  for (let t = 2; t <= 40; t++) curve.push(180 + 900 / t);
  return {
    fit: 'houses-fit-1',
    dataset: { label: 'houses.csv', uri: 'file:///work/demo/houses.csv' },
    target: 'price_k',
    task: 'regression',
    classes: [],
    trees: 40,
    rowsUsed: 5000,
    rowsRead: 48000,
    sampled: true,
    features: [
      { name: 'area_m2', kind: 'numeric' },
      { name: 'distance_km', kind: 'numeric' },
      { name: 'has_garden', kind: 'boolean' },
    ],
    dropped: [],
    oob: { kind: 'regression', rows: 5000, r2: 0.8123, mae: 11.2, rmse: 14.9, residuals: { min: -61.2, q1: -8.1, median: 0.4, q3: 8.6, max: 70.3 } },
    heldOut: null,
    curve,
    importance: [
      { feature: 'area_m2', impurity: 0.62, permutation: 410, permutationSpread: 22 },
      { feature: 'distance_km', impurity: 0.3, permutation: 180, permutationSpread: 15 },
      { feature: 'has_garden', impurity: 0.08, permutation: 12, permutationSpread: 6 },
    ],
    warnings: [],
    fitSeconds: 2.1,
    suspectCount: 0,
  };
}

export function priceAt(area: number, dist: number): number {
  return 40 + 2.2 * area - 6 * dist;
}

export function regressionMap(nx = 40, ny = 40): RegionMap {
  const xa: NumericAxis = { feature: 'area_m2', kind: 'numeric', min: 30, max: 200 };
  const ya: NumericAxis = { feature: 'distance_km', kind: 'numeric', min: 0, max: 30 };
  const value: number[] = [];
  for (let j = 0; j < ny; j++) for (let i = 0; i < nx; i++) value.push(priceAt(cellCentre(xa, nx, i), cellCentre(ya, ny, j)));
  const r = rng(3);
  const x: number[] = [];
  const y: number[] = [];
  const target: number[] = [];
  const row: number[] = [];
  for (let n = 0; n < 400; n++) {
    const a = 30 + r() * 170;
    const d = r() * 30;
    x.push(a);
    y.push(d);
    target.push(priceAt(a, d) + (r() - 0.5) * 30);
    row.push(1 + n * 12);
  }
  return {
    x: xa,
    y: ya,
    nx,
    ny,
    cells: { task: 'regression', value },
    reference: { mode: 'averaged', sampleRows: 300 },
    heldAt: [],
    points: { x, y, target, row, total: 5000 },
  };
}

// ---------------------------------------------------------------------------------------------
// Explanations for the invented flower scenario: numbers chosen by hand so base + contributions is the
// prediction, with the hostile feature name among them.

export function contributionsMessage(row = 71): Extract<HostMessage, { type: 'contributions' }> {
  const features = [
    { feature: 'petal_len', value: '4.7', contribution: 0.31 },
    { feature: 'petal_wid', value: '1.4', contribution: 0.22 },
    { feature: HOSTILE_FEATURE, value: '<b>3.1</b>', contribution: -0.07 },
    { feature: 'colour', value: HOSTILE_LEVEL, contribution: 0.01 },
  ];
  const base = 1 / 3;
  return {
    type: 'contributions',
    row,
    state: 'ready',
    // Row 71 is a training row: the host explains it over the trees that never saw it.
    contributions: { row, output: 1, base, prediction: base + features.reduce((a, f) => a + f.contribution, 0), trees: 20, outOfBag: true, features },
    text: '',
  };
}

/** A row of a wider table (14 features), so the panel folds all but the largest into one row. */
export function contributionsWide(row = 33): Extract<HostMessage, { type: 'contributions' }> {
  const sizes = [0.21, -0.15, 0.12, -0.1, 0.08, 0.07, -0.06, 0.05, 0.03, -0.02, 0.015, 0.01, -0.005, 0.002];
  // Listed out of order on purpose: the panel sorts by size.
  const order = [3, 0, 13, 7, 1, 10, 5, 12, 2, 9, 4, 11, 6, 8];
  const features = order.map((k) => ({ feature: `f${String(k + 1).padStart(2, '0')}`, value: String(10 + k), contribution: sizes[k] }));
  const base = 0.4;
  return {
    type: 'contributions',
    row,
    state: 'ready',
    contributions: { row, output: 0, base, prediction: base + sizes.reduce((a, b) => a + b, 0), trees: TREES, outOfBag: false, features },
    text: '',
  };
}

export function globalMessage(rows: number, done: boolean): Extract<HostMessage, { type: 'globalContributions' }> {
  return {
    type: 'globalContributions',
    global: {
      rows,
      planned: 100,
      done,
      features: [
        { feature: 'petal_len', meanAbs: 0.3 },
        { feature: 'petal_wid', meanAbs: 0.25 },
        { feature: HOSTILE_FEATURE, meanAbs: 0.04 },
        { feature: 'colour', meanAbs: 0.01 },
      ],
    },
    text: '',
  };
}

/** Petal length from 1 to 7 on 13 points; no training row between 2.25 and 2.75 (Fisher's gap, invented here). */
export function dependenceNumeric(output = 1): Extract<HostMessage, { type: 'dependence' }> {
  const grid = Array.from({ length: 13 }, (_, g) => 1 + g * 0.5);
  const boundaries = grid.slice(1).map((v) => v - 0.25);
  const counts = grid.map((v) => (v === 2.5 ? 0 : v < 2.5 ? 16 : 9));
  const curve = (shift: number) => grid.map((v) => Math.max(0, Math.min(1, (v - 2.5) / 3 + shift)));
  const ice = [curve(0.1), curve(0), curve(-0.1), curve(0.05)];
  const average = grid.map((_, g) => ice.reduce((a, c) => a + c[g], 0) / ice.length);
  return {
    type: 'dependence',
    dependence: { feature: 'petal_len', kind: 'numeric', grid, labels: null, output, average, ice, iceRows: [3, 40, 71, 120], counts, boundaries, missing: 2 },
  };
}

export function dependenceLevels(): Extract<HostMessage, { type: 'dependence' }> {
  return {
    type: 'dependence',
    dependence: {
      feature: 'colour',
      kind: 'categorical',
      grid: [0, 1, 2],
      labels: ['red', HOSTILE_LEVEL, 'blue'],
      output: 2,
      average: [0.3, 0.35, 0.31],
      ice: [
        [0.2, 0.3, 0.2],
        [0.4, 0.4, 0.42],
      ],
      iceRows: [5, 9],
      counts: [50, 0, 98],
      boundaries: [],
      missing: 0,
    },
  };
}

export function sweepDone(current: number | null): Extract<HostMessage, { type: 'sweep' }> {
  return {
    type: 'sweep',
    state: 'done',
    progress: null,
    text: '4 forests in 2.1 s.',
    result: {
      task: 'classification',
      features: 4,
      defaultCount: 2,
      points: [
        { featuresPerSplit: 1, oobError: 0.08, oobScore: 0.92, seconds: 0.4 },
        { featuresPerSplit: 2, oobError: 0.066, oobScore: 0.934, seconds: 0.5 },
        { featuresPerSplit: 3, oobError: 0.053, oobScore: 0.947, seconds: 0.6 },
        { featuresPerSplit: 4, oobError: 0.06, oobScore: 0.94, seconds: 0.7 },
      ],
      best: 3,
      current,
    },
  };
}
