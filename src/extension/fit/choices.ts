// The choices behind one fit: settings' defaults, changed by the "adjust" step or a refit from the panel.
// Pure: parsing and describing live here; the quick-pick loop that drives them lives in fitDialog.ts.

import type { FeaturesPerSplit, ForestParams, Task } from '../engine';
import { parseFeaturesPerSplit } from '../../core/forest/params';
import type { TrainingSettings } from '../settings';
import { forestParamsFrom } from '../settings';

export interface FitChoices {
  readonly target: string;
  readonly task: Task;
  readonly trees: number;
  readonly featuresPerSplit: FeaturesPerSplit | 'auto';
  readonly maxDepth: number | null;
  readonly minLeaf: number;
  readonly seed: number;
  /** Fraction of rows held out of training; 0 for none (the out-of-bag score is then the estimate). */
  readonly holdout: number;
  readonly exclude: readonly string[];
  /** k-fold cross-validation after the fit: K more forests (absent or 0: none). */
  readonly folds?: number;
}

export type AdjustKey = 'task' | 'trees' | 'featuresPerSplit' | 'maxDepth' | 'minLeaf' | 'seed' | 'holdout' | 'folds' | 'exclude';

export function choicesFrom(t: TrainingSettings, target: string, task: Task): FitChoices {
  return {
    target,
    task,
    trees: t.trees,
    featuresPerSplit: t.featuresPerSplit,
    maxDepth: t.maxDepth,
    minLeaf: t.minLeaf,
    seed: t.seed,
    holdout: t.holdout,
    exclude: [],
  };
}

/** Core's parameters for these choices; settings fill in what the adjust step does not offer. */
export function paramsFor(c: FitChoices, t: TrainingSettings): Partial<ForestParams> {
  return forestParamsFrom(
    { ...t, trees: c.trees, featuresPerSplit: c.featuresPerSplit, maxDepth: c.maxDepth, minLeaf: c.minLeaf, seed: c.seed },
    c.task,
  );
}

export const ADJUST_LABELS: Record<AdjustKey, string> = {
  task: 'Task',
  trees: 'Trees',
  featuresPerSplit: 'Features tried per split',
  maxDepth: 'Depth limit',
  minLeaf: 'Smallest leaf (rows)',
  seed: 'Random seed',
  holdout: 'Rows held out for scoring',
  folds: 'Cross-validation folds',
  exclude: 'Columns left out',
};

export function describeChoice(c: FitChoices, key: AdjustKey): string {
  switch (key) {
    case 'task':
      return c.task;
    case 'trees':
      return String(c.trees);
    case 'featuresPerSplit':
      return c.featuresPerSplit === 'auto'
        ? `auto (${c.task === 'classification' ? 'square root' : 'a third'} of the features)`
        : String(c.featuresPerSplit);
    case 'maxDepth':
      return c.maxDepth === null ? 'none' : String(c.maxDepth);
    case 'minLeaf':
      return String(c.minLeaf);
    case 'seed':
      return String(c.seed);
    case 'holdout':
      return c.holdout > 0 ? `${Math.round(c.holdout * 1000) / 10}%` : 'none (out-of-bag estimate only)';
    case 'folds':
      return c.folds ? `${c.folds} (fits ${c.folds} more forests, each scored on the rows it left out)` : 'none';
    case 'exclude':
      return c.exclude.length ? c.exclude.join(', ') : 'none';
  }
}

export type Parsed<T> = { ok: true; value: T } | { ok: false; message: string };

/** Parses what the user typed for a numeric choice; the message is shown under the input box. */
export function parseChoice(key: Exclude<AdjustKey, 'task' | 'exclude'>, text: string): Parsed<FitChoices[typeof key]> {
  const t = text.trim();
  const whole = (min: number, max: number): Parsed<number> => {
    // Digits only: "1e9" or "0x10" would otherwise pass as numbers no one typed.
    const n = /^\+?\d{1,16}$/.test(t) ? Number(t) : NaN;
    return Number.isSafeInteger(n) && n >= min && n <= max
      ? { ok: true, value: n }
      : { ok: false, message: `Enter a whole number from ${min} to ${max}.` };
  };
  switch (key) {
    case 'trees':
      return whole(1, 10000);
    case 'minLeaf':
      return whole(1, 1_000_000);
    case 'seed':
      return whole(0, 2 ** 31 - 1);
    case 'maxDepth': {
      if (t === '' || t === '0' || /^(none|no limit|unlimited)$/i.test(t)) return { ok: true, value: null };
      return whole(1, 1000);
    }
    case 'featuresPerSplit': {
      if (t === '' || t.toLowerCase() === 'auto') return { ok: true, value: 'auto' };
      try {
        return { ok: true, value: parseFeaturesPerSplit(t) };
      } catch (e) {
        return { ok: false, message: (e as Error).message };
      }
    }
    case 'folds':
      if (t === '' || t === '0' || /^none$/i.test(t)) return { ok: true, value: 0 };
      return whole(2, 20);
    case 'holdout': {
      const pct = t.endsWith('%');
      const n = Number(pct ? t.slice(0, -1) : t);
      const f = pct || n >= 1 ? n / 100 : n;
      if (t === '' || !Number.isFinite(n) || f < 0 || f > 0.9) {
        return { ok: false, message: 'Enter a share of rows from 0 to 90%, e.g. 20% or 0.2 (0 for none).' };
      }
      return { ok: true, value: f };
    }
  }
}
