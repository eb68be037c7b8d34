// In a real VS Code: the extension activates, registers the contract's commands, and answers hovers on the
// fitted CSV from a forest fitted through core (the quick-pick flow itself is driven in test/e2e).
import * as assert from 'node:assert/strict';
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { CopseContext } from '../../../src/extension/context';
import { loadCsv } from '../../../src/core/csv/load';
import { fitForest } from '../../../src/core/forest/fit';
import { Scorer } from '../../../src/core/forest/scorer';
import { ForestSession } from '../../../src/extension/session/session';
import { csvOf, summaryFor } from '../../extension/helpers';
import { readFileSync } from 'node:fs';
import { inBagCounts } from '../../../src/core/forest/bootstrap';

const workspace = process.env.COPSE_HOST_WORKSPACE ?? '';
const csv = path.join(workspace, 'iris.csv');

async function activate(): Promise<CopseContext> {
  const ext = vscode.extensions.getExtension<{ context: CopseContext }>('copse.copse');
  assert.ok(ext, 'the extension under development is installed');
  const api = await ext.activate();
  return api.context;
}

describe('Copse in the extension host', () => {
  let ctx: CopseContext;
  before(async () => {
    ctx = await activate();
  });

  it('registers the commands of the UI contract', async () => {
    const all = await vscode.commands.getCommands(true);
    for (const id of ['copse.fit', 'copse.openModel', 'copse.predictToFile', 'copse.saveModel', 'copse.showPanel']) assert.ok(all.includes(id), id);
  });

  it('hovers a data row of the fitted CSV with its votes, and not the header', async () => {
    const load = await loadCsv(csv);
    const report = await fitForest(load.table, { target: 'species', params: { trees: 20, seed: 1 }, workers: 1 });
    const summary = summaryFor(report, { table: load.table, rowsRead: 150 }, 'iris.csv');
    const session = await ForestSession.create({
      forest: report.forest,
      csv: csvOf(csv, load),
      text: () => readFileSync(csv, 'utf8'),
      oob: { trainRows: report.trainRows, inBag: inBagCounts(report.forest.params, report.forest.trees.length, report.trainRows.length) },
      summary,
      scorer: new Scorer(report.forest),
    });
    ctx.setSession(session);
    const doc = await vscode.workspace.openTextDocument(csv);
    await vscode.window.showTextDocument(doc);
    const text = async (line: number) => {
      const hovers = await vscode.commands.executeCommand<vscode.Hover[]>('vscode.executeHoverProvider', doc.uri, new vscode.Position(line, 2));
      return hovers.flatMap((h) => h.contents.map((c) => (typeof c === 'string' ? c : 'value' in c ? c.value : ''))).join('\n');
    };
    assert.doesNotMatch(await text(0), /Copse/);
    assert.match(await text(1), /row 1 \(training row; \d+ of 20 trees never saw it\)/);
    assert.match(await text(149), /row 149/);
  });

  it('shows the panel on request', async () => {
    await vscode.commands.executeCommand('copse.showPanel');
    const tabs = vscode.window.tabGroups.all.flatMap((g) => g.tabs);
    assert.ok(tabs.some((t) => t.input instanceof vscode.TabInputWebview && t.input.viewType.endsWith('copse.panel')));
  });
});
