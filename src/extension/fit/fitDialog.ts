// The quick picks of the fit flow: choose the target (fitting starts on accept), optionally adjust first.

import * as vscode from 'vscode';
import type { Task } from '../engine';
import { ADJUST_LABELS, describeChoice, parseChoice, type AdjustKey, type FitChoices } from './choices';
import { describeProfile, otherTask, taskAllowed, type ColumnProfile } from './columnProfile';

export interface TargetPick {
  readonly profile: ColumnProfile;
  readonly task: Task;
  readonly adjust: boolean;
}

interface ColumnItem extends vscode.QuickPickItem {
  readonly profile: ColumnProfile;
}

interface AdjustToggle extends vscode.QuickPickItem {
  readonly adjustToggle: true;
}

type PickItem = ColumnItem | AdjustToggle | vscode.QuickPickItem;

const ADJUST_BUTTON: vscode.QuickInputButton = {
  iconPath: new vscode.ThemeIcon('settings-gear'),
  tooltip: 'Adjust the settings before fitting',
};

function switchButton(task: Task): vscode.QuickInputButton {
  return { iconPath: new vscode.ThemeIcon('arrow-swap'), tooltip: `Fit as ${task} instead` };
}

/** Resolves with the chosen column, or undefined when the user dismisses the pick. */
export function pickTarget(profiles: readonly ColumnProfile[], fileLabel: string): Promise<TargetPick | undefined> {
  return new Promise((resolve) => {
    const qp = vscode.window.createQuickPick<PickItem>();
    let adjustAll = false;
    const placeholder = (): string =>
      adjustAll
        ? 'Pick the column to predict; you will adjust the settings next'
        : 'Pick the column to predict; Enter fits now with your settings';
    qp.title = `Copse: fit a forest on ${fileLabel}`;
    qp.placeholder = placeholder();
    qp.matchOnDescription = true;
    qp.buttons = [ADJUST_BUTTON];
    const columns: ColumnItem[] = profiles.map((p) => {
      const buttons: vscode.QuickInputButton[] = [];
      if (p.task && taskAllowed(p, otherTask(p.task))) buttons.push(switchButton(otherTask(p.task)));
      buttons.push(ADJUST_BUTTON);
      return { label: p.name, description: describeProfile(p), profile: p, buttons };
    });
    // The adjust step as an item too, for keyboard users: choosing it arms "adjust first" and goes back to the columns.
    const adjustItem = (): AdjustToggle => ({
      label: adjustAll ? '$(check) Settings will be adjusted before fitting' : '$(settings-gear) Adjust the settings before fitting…',
      description: adjustAll ? 'choose again to fit straight away' : 'trees, features per split, depth, leaf size, seed, holdout, columns left out',
      adjustToggle: true,
      alwaysShow: true,
    });
    // The last column is the usual home of the outcome in a tidy table.
    const last = columns[columns.length - 1];
    const setItems = (): void => {
      qp.items = [...columns, { label: '', kind: vscode.QuickPickItemKind.Separator }, adjustItem()];
      if (last) qp.activeItems = [last];
    };
    setItems();
    let done = false;
    const finish = (value: TargetPick | undefined): void => {
      if (done) return;
      done = true;
      resolve(value);
      qp.dispose();
    };
    const toggle = (): void => {
      adjustAll = !adjustAll;
      qp.placeholder = placeholder();
      setItems();
    };
    qp.onDidTriggerButton(toggle);
    qp.onDidTriggerItemButton((e) => {
      if (!('profile' in e.item)) return;
      const p = e.item.profile;
      const inferred = p.task ?? 'classification';
      if (e.button === ADJUST_BUTTON) finish({ profile: p, task: inferred, adjust: true });
      else finish({ profile: p, task: otherTask(inferred), adjust: adjustAll });
    });
    qp.onDidAccept(() => {
      const item = qp.selectedItems[0] ?? qp.activeItems[0];
      if (!item) return;
      if ('adjustToggle' in item) {
        qp.value = '';
        toggle();
        return;
      }
      if ('profile' in item) finish({ profile: item.profile, task: item.profile.task ?? 'classification', adjust: adjustAll });
    });
    qp.onDidHide(() => finish(undefined));
    qp.show();
  });
}

interface AdjustItem extends vscode.QuickPickItem {
  readonly key?: AdjustKey;
}

const ORDER: AdjustKey[] = ['task', 'trees', 'featuresPerSplit', 'maxDepth', 'minLeaf', 'seed', 'holdout', 'folds', 'exclude'];

/** Lets the user change the fit's choices one at a time; resolves on "Fit now", undefined on dismiss. */
export async function adjustChoices(
  start: FitChoices,
  target: ColumnProfile,
  featureNames: readonly string[],
): Promise<FitChoices | undefined> {
  let c = start;
  for (;;) {
    const items: AdjustItem[] = [
      { label: '$(play) Fit now', description: `${c.trees} trees predicting ${c.target} (${c.task})` },
      { label: '', kind: vscode.QuickPickItemKind.Separator },
      ...ORDER.map((key) => ({ label: ADJUST_LABELS[key], description: describeChoice(c, key), key })),
    ];
    const pick = await vscode.window.showQuickPick(items, {
      title: `Copse: adjust the fit on ${c.target}`,
      placeHolder: 'Choose a setting to change, or Fit now',
      ignoreFocusOut: true,
    });
    if (!pick) return undefined;
    if (!pick.key) return c;
    const next = await editChoice(c, pick.key, target, featureNames);
    if (next) c = next;
  }
}

async function editChoice(c: FitChoices, key: AdjustKey, target: ColumnProfile, featureNames: readonly string[]): Promise<FitChoices | undefined> {
  if (key === 'task') {
    const tasks = (['classification', 'regression'] as const).filter((t) => taskAllowed(target, t));
    const pick = await vscode.window.showQuickPick(
      tasks.map((t) => ({ label: t, description: t === target.task ? 'inferred from the column' : undefined })),
      { title: `Fit ${c.target} as` },
    );
    return pick ? { ...c, task: pick.label } : undefined;
  }
  if (key === 'exclude') {
    const chosen = new Set(c.exclude);
    const pick = await vscode.window.showQuickPick(
      featureNames.filter((n) => n !== c.target).map((n) => ({ label: n, picked: chosen.has(n) })),
      { title: 'Columns to leave out of the fit', canPickMany: true, ignoreFocusOut: true },
    );
    return pick ? { ...c, exclude: pick.map((p) => p.label) } : undefined;
  }
  const text = await vscode.window.showInputBox({
    title: ADJUST_LABELS[key],
    value: key === 'holdout' ? String(c.holdout) : key === 'folds' ? String(c.folds ?? 0) : key === 'maxDepth' ? (c.maxDepth === null ? 'none' : String(c.maxDepth)) : String(c[key]),
    prompt: PROMPTS[key],
    validateInput: (t) => {
      const r = parseChoice(key, t);
      return r.ok ? undefined : r.message;
    },
  });
  if (text === undefined) return undefined;
  const r = parseChoice(key, text);
  return r.ok ? { ...c, [key]: r.value } : undefined;
}

const PROMPTS: Record<Exclude<AdjustKey, 'task' | 'exclude'>, string> = {
  trees: 'How many trees to grow. More trees steady the scores; the out-of-bag curve shows when more stop helping.',
  featuresPerSplit: 'auto, sqrt, third, log2, all, a whole number, or a fraction such as 0.5',
  maxDepth: 'Deepest level a tree may reach; none lets trees grow until leaves are pure or too small',
  minLeaf: 'Fewest training rows a leaf may hold; larger values smooth the regions',
  seed: 'Seed for the bootstrap draws and feature choices; the same seed gives the same forest',
  holdout: 'Share of rows kept out of training and scored at the end, e.g. 20% (0 for none)',
  folds: 'Estimate the scores by k-fold cross-validation too: 2 to 20 folds, stratified by class (0 for none)',
};
