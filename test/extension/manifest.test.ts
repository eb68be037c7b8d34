// package.json contributions against the commands the README promises and the host's own ids.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { COMMANDS } from '../../src/extension/commands/host';
import { PANEL_VIEW_TYPE_ID } from '../../src/extension/panel/viewType';

const root = path.resolve(__dirname, '..', '..', '..');
/** The parts of package.json these checks read. */
interface Manifest {
  main: string;
  engines: { vscode: string };
  activationEvents: string[];
  contributes: {
    commands: Array<{ command: string; title: string; category: string }>;
    menus: Record<string, Array<{ command: string; when: string }>>;
    colors: Array<{ id: string }>;
    keybindings: Array<{ command: string; key: string; mac: string; when: string }>;
    walkthroughs: Array<{ steps: Array<{ id: string; description: string; media: { markdown: string }; completionEvents: string[] }> }>;
    configuration: { properties: Record<string, unknown> };
  };
  capabilities: { untrustedWorkspaces: { supported: string; description: string; restrictedConfigurations: string[] }; virtualWorkspaces: { supported: boolean } };
  extensionKind: string[];
}
const pkg = JSON.parse(fs.readFileSync(path.join(root, 'package.json'), 'utf8')) as Manifest;
const contributed = pkg.contributes.commands;

describe('extension manifest', () => {
  it('contributes the README\'s commands, all in the Copse category', () => {
    const ids = contributed.map((c) => c.command);
    for (const id of ['copse.fit', 'copse.openModel', 'copse.predictToFile', 'copse.saveModel', 'copse.exportOnnx', 'copse.showPanel']) assert.ok(ids.includes(id), id);
    assert.deepEqual(ids.sort(), Object.values(COMMANDS).sort(), 'every registered command is declared, and only those');
    for (const c of contributed) assert.equal(c.category, 'Copse');
  });

  it('offers fit, open and predict on .csv, .tsv, their .gz copies and .parquet files in the explorer and the editor title', () => {
    for (const menu of ['explorer/context', 'editor/title']) {
      const items = pkg.contributes.menus[menu];
      for (const id of ['copse.fit', 'copse.openModel', 'copse.predictToFile']) {
        const item = items.find((i) => i.command === id);
        assert.ok(item, `${id} in ${menu}`);
        const re = /resourceFilename =~ \/(.*)\/i/.exec(item.when);
        assert.ok(re, item.when);
        const name = new RegExp(re[1], 'i');
        for (const ok of ['a.csv', 'b.TSV', 'c.csv.gz', 'd.tsv.GZ', 'e.parquet']) assert.match(ok, name);
        for (const no of ['a.json', 'a.csvx', 'a.txt', 'a.gz', 'a.parquet.json', 'a.csv.gz.txt']) assert.doesNotMatch(no, name);
      }
    }
  });

  it('hides the internal commands from the palette and every menu refers to a declared command', () => {
    const palette = pkg.contributes.menus.commandPalette;
    assert.equal(palette.find((p) => p.command === COMMANDS.revealRow)?.when, 'false');
    // Without a row it takes the row under the cursor, so the palette offers it once there is a forest.
    assert.equal(palette.find((p) => p.command === COMMANDS.showRowVotes)?.when, 'copse.hasForest');
    const ids = new Set(contributed.map((c) => c.command));
    for (const items of Object.values(pkg.contributes.menus)) for (const i of items) assert.ok(ids.has(i.command), i.command);
  });

  it('activates for a restored panel and keeps engines.vscode at ^1.100.0', () => {
    assert.deepEqual(pkg.activationEvents, [`onWebviewPanel:${PANEL_VIEW_TYPE_ID}`]);
    assert.equal(pkg.engines.vscode, '^1.100.0');
    assert.equal(pkg.main, './dist/extension.js');
  });

  it('declares the colours the suspect decoration uses', () => {
    const ids = pkg.contributes.colors.map((c) => c.id);
    const src = fs.readFileSync(path.join(root, 'src', 'extension', 'editor', 'rowMarks.ts'), 'utf8');
    const used = [...src.matchAll(/ThemeColor\('([^']+)'\)/g)].map((m) => m[1]);
    assert.ok(used.length >= 1);
    for (const u of used) assert.ok(ids.includes(u), u);
  });

  it('declares Restricted Mode as limited to settings that exist, runs beside the files, and no virtual workspaces', () => {
    const trust = pkg.capabilities.untrustedWorkspaces;
    assert.equal(trust.supported, 'limited');
    assert.ok(trust.description.length > 80);
    for (const key of trust.restrictedConfigurations) assert.ok(key in pkg.contributes.configuration.properties, key);
    assert.ok(trust.restrictedConfigurations.includes('copse.training.workers') && trust.restrictedConfigurations.includes('copse.training.trees'));
    assert.equal(pkg.capabilities.virtualWorkspaces.supported, false);
    assert.deepEqual(pkg.extensionKind, ['workspace']);
  });

  it('binds keys only to declared commands, in CSV editors, and ships every walkthrough file', () => {
    const ids = new Set(contributed.map((c) => c.command));
    for (const k of pkg.contributes.keybindings) {
      assert.ok(ids.has(k.command), k.command);
      assert.match(k.when, /editorTextFocus/);
      assert.match(k.when, /resourceExtname/);
      assert.ok(k.mac.startsWith('cmd+'), 'macOS uses Cmd where others use Ctrl');
    }
    const ignore = fs.readFileSync(path.join(root, '.vscodeignore'), 'utf8');
    assert.match(ignore, /^!demo\/kite-flights\.csv$/m, 'the demo data the first step opens is packaged');
    assert.match(ignore, /^!walkthrough\/\*\.md$/m);
    const steps = pkg.contributes.walkthroughs[0].steps;
    assert.equal(steps.length, 4);
    for (const st of steps) {
      assert.ok(fs.existsSync(path.join(root, st.media.markdown)), st.media.markdown);
      assert.ok(st.completionEvents.length > 0, st.id);
      for (const m of st.description.matchAll(/\(command:([\w.]+)\)/g)) assert.ok(ids.has(m[1]), m[1]);
    }
  });
});
