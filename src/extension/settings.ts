// The one typed view of the `copse.*` settings. Pure: any object with `get(key)` will do, so tests pass
// a plain map and the extension passes vscode.workspace.getConfiguration('copse').
//
// Every key here has a matching entry in package.json `contributes.configuration`; a unit test keeps the
// two in step, so a default changed in one place and not the other fails the build.

import type { FeaturesPerSplit, ForestParams, Task } from '../core/forest/params';
import { parseFeaturesPerSplit } from '../core/forest/params';

export interface ConfigSource {
  get<T>(key: string): T | undefined;
}

export interface TrainingSettings {
  readonly trees: number;
  /** 'auto' lets the task choose (core's defaults). */
  readonly featuresPerSplit: FeaturesPerSplit | 'auto';
  /** null: no limit. */
  readonly maxDepth: number | null;
  readonly minLeaf: number;
  readonly minSplit: number;
  readonly sampleFraction: number;
  readonly withReplacement: boolean;
  readonly impurity: 'auto' | 'gini' | 'entropy';
  readonly balanceClasses: boolean;
  readonly seed: number;
  readonly holdout: number;
  /** 0: one per available core. */
  readonly workers: number;
  readonly permutationImportance: boolean;
}

export interface DataSettings {
  readonly sampleAboveMegabytes: number;
  readonly sampleRows: number;
}

export interface PanelSettings {
  readonly gridResolution: number;
  readonly pointsDrawn: number;
  readonly dependenceRows: number;
  readonly pairFeatures: number;
}

export interface EditorSettings {
  readonly hover: boolean;
  readonly markSuspects: boolean;
  readonly suspectLimit: number;
}

export interface ExplainSettings {
  /** Share of the conditional distribution a regression prediction interval holds, strictly between 0 and 1. */
  readonly intervalLevel: number;
}

export interface CopseSettings {
  readonly training: TrainingSettings;
  readonly data: DataSettings;
  readonly panel: PanelSettings;
  readonly editor: EditorSettings;
  readonly explain: ExplainSettings;
}

/** Defaults, keyed exactly as in package.json (without the `copse.` prefix). */
export const SETTING_DEFAULTS = {
  'training.trees': 100,
  'training.featuresPerSplit': 'auto',
  'training.maxDepth': 0,
  'training.minLeaf': 1,
  'training.minSplit': 2,
  'training.sampleFraction': 1,
  'training.withReplacement': true,
  'training.impurity': 'auto',
  'training.balanceClasses': false,
  'training.seed': 1,
  'training.holdout': 0,
  'training.workers': 0,
  'training.permutationImportance': true,
  'data.sampleAboveMegabytes': 50,
  'data.sampleRows': 50000,
  'panel.gridResolution': 80,
  'panel.pointsDrawn': 2000,
  'panel.dependenceRows': 40,
  'panel.pairFeatures': 4,
  'editor.hover': true,
  'editor.markSuspects': true,
  'editor.suspectLimit': 200,
  'explain.intervalLevel': 0.9,
} as const;

export type SettingKey = keyof typeof SETTING_DEFAULTS;

export interface SettingsRead {
  readonly settings: CopseSettings;
  /** One sentence per value that was out of range and replaced by its default. */
  readonly problems: string[];
}

export function readSettings(source: ConfigSource): SettingsRead {
  const problems: string[] = [];
  const int = (key: SettingKey, min: number, max = Number.MAX_SAFE_INTEGER): number => {
    const fallback = SETTING_DEFAULTS[key] as number;
    const v = source.get<unknown>(key);
    if (v === undefined || v === null) return fallback;
    if (typeof v !== 'number' || !Number.isInteger(v) || v < min || v > max) {
      problems.push(`copse.${key} must be a whole number from ${min}${max < Number.MAX_SAFE_INTEGER ? ` to ${max}` : ''}; using ${fallback}.`);
      return fallback;
    }
    return v;
  };
  const num = (key: SettingKey, min: number, max: number, openMin = false, openMax = false): number => {
    const fallback = SETTING_DEFAULTS[key] as number;
    const v = source.get<unknown>(key);
    if (v === undefined || v === null) return fallback;
    const ok =
      typeof v === 'number' && Number.isFinite(v) && (openMin ? v > min : v >= min) && (openMax ? v < max : v <= max);
    if (!ok) {
      problems.push(`copse.${key} must be a number in ${openMin ? '(' : '['}${min}, ${max}${openMax ? ')' : ']'}; using ${fallback}.`);
      return fallback;
    }
    return v;
  };
  const bool = (key: SettingKey): boolean => {
    const fallback = SETTING_DEFAULTS[key] as boolean;
    const v = source.get<unknown>(key);
    if (v === undefined || v === null) return fallback;
    if (typeof v !== 'boolean') {
      problems.push(`copse.${key} must be true or false; using ${fallback}.`);
      return fallback;
    }
    return v;
  };
  const oneOf = <T extends string>(key: SettingKey, allowed: readonly T[]): T => {
    const fallback = SETTING_DEFAULTS[key] as T;
    const v = source.get<unknown>(key);
    if (v === undefined || v === null) return fallback;
    if (typeof v !== 'string' || !(allowed as readonly string[]).includes(v)) {
      problems.push(`copse.${key} must be one of ${allowed.join(', ')}; using ${fallback}.`);
      return fallback;
    }
    return v as T;
  };

  const featuresPerSplit = ((): FeaturesPerSplit | 'auto' => {
    const v = source.get<unknown>('training.featuresPerSplit');
    if (v === undefined || v === null || v === 'auto' || v === '') return 'auto';
    try {
      return parseFeaturesPerSplit(typeof v === 'string' || typeof v === 'number' ? String(v) : JSON.stringify(v));
    } catch (e) {
      problems.push(`copse.training.featuresPerSplit: ${(e as Error).message}; using auto.`);
      return 'auto';
    }
  })();

  const depth = int('training.maxDepth', 0, 1000);
  const training: TrainingSettings = {
    trees: int('training.trees', 1, 10000),
    featuresPerSplit,
    maxDepth: depth === 0 ? null : depth,
    minLeaf: int('training.minLeaf', 1),
    minSplit: int('training.minSplit', 2),
    sampleFraction: num('training.sampleFraction', 0, 1, true, false),
    withReplacement: bool('training.withReplacement'),
    impurity: oneOf('training.impurity', ['auto', 'gini', 'entropy'] as const),
    balanceClasses: bool('training.balanceClasses'),
    seed: int('training.seed', 0, 2 ** 31 - 1),
    holdout: num('training.holdout', 0, 0.9),
    workers: int('training.workers', 0, 64),
    permutationImportance: bool('training.permutationImportance'),
  };
  return {
    settings: {
      training,
      data: {
        sampleAboveMegabytes: num('data.sampleAboveMegabytes', 0, 1e6),
        sampleRows: int('data.sampleRows', 100),
      },
      panel: {
        gridResolution: int('panel.gridResolution', 10, 400),
        pointsDrawn: int('panel.pointsDrawn', 0, 100000),
        dependenceRows: int('panel.dependenceRows', 1, 1000),
        pairFeatures: int('panel.pairFeatures', 2, 8),
      },
      editor: {
        hover: bool('editor.hover'),
        markSuspects: bool('editor.markSuspects'),
        suspectLimit: int('editor.suspectLimit', 0, 100000),
      },
      explain: {
        intervalLevel: num('explain.intervalLevel', 0, 1, true, true),
      },
    },
    problems,
  };
}

/** The training settings as core's parameter overrides, for a chosen task. */
export function forestParamsFrom(t: TrainingSettings, task: Task): Partial<ForestParams> {
  const params: { -readonly [K in keyof ForestParams]?: ForestParams[K] } = {
    task,
    trees: t.trees,
    maxDepth: t.maxDepth,
    minLeaf: t.minLeaf,
    minSplit: t.minSplit,
    sampleFraction: t.sampleFraction,
    replace: t.withReplacement,
    seed: t.seed,
  };
  if (t.featuresPerSplit !== 'auto') params.featuresPerSplit = t.featuresPerSplit;
  if (task === 'classification') {
    if (t.impurity !== 'auto') params.criterion = t.impurity;
    params.classWeight = t.balanceClasses ? 'balanced' : 'none';
  }
  return params;
}
