// The columns "predict into a new CSV" appends, from one scored table.

import type { Prediction, Schema } from '../engine';
import type { AddedColumn } from './predictionsCsv';
import { uniqueNames } from './predictionsCsv';

/** Probabilities and spreads carry six decimals: plenty for a share of at most a few thousand trees. */
const fixed = (v: number): string => (Number.isFinite(v) ? String(Number(v.toFixed(6))) : '');

export function predictionColumns(schema: Schema, prediction: Prediction, existing: readonly string[]): AddedColumn[] {
  const target = schema.target;
  const n = prediction.rows;
  if (target.task === 'classification') {
    const classes = target.classes ?? [];
    const K = classes.length;
    const names = uniqueNames(
      [`predicted_${target.name}`, ...classes.map((c) => `probability_${c}`), 'tree_agreement'],
      existing,
    );
    const cols: AddedColumn[] = [
      { name: names[0], cells: Array.from(prediction.predicted, (c) => classes[c] ?? '') },
    ];
    for (let k = 0; k < K; k++) {
      const cells = new Array<string>(n);
      for (let i = 0; i < n; i++) cells[i] = fixed(prediction.proba ? prediction.proba[i * K + k] : NaN);
      cols.push({ name: names[1 + k], cells });
    }
    cols.push({ name: names[K + 1], cells: Array.from(prediction.agreement ?? new Float64Array(n).fill(NaN), fixed) });
    return cols;
  }
  const names = uniqueNames([`predicted_${target.name}`, 'tree_spread'], existing);
  return [
    { name: names[0], cells: Array.from(prediction.predicted, (v) => (Number.isFinite(v) ? String(v) : '')) },
    { name: names[1], cells: Array.from(prediction.spread ?? new Float64Array(n).fill(NaN), fixed) },
  ];
}
