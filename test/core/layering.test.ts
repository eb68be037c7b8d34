// src/core's layering (DEVELOPERS.md, Architecture), read from the import statements of its sources: the engine
// never reaches up into the editor or the command line, base/, data/ and tree/ stay below what they feed, and
// no two folders of src/core import each other, directly or round a loop.
import * as assert from 'node:assert/strict';
import { readdirSync, readFileSync, statSync } from 'node:fs';
import * as path from 'node:path';

const root = path.join(__dirname, '..', '..', '..');
const core = path.join(root, 'src', 'core');

/** Module specifiers a TypeScript source imports, re-exports, requires or imports dynamically. */
function importsOf(source: string): string[] {
  const patterns = [
    // import x from '…', import { a,\n b } from '…', import type …, import '…', export … from '…'
    /^[ \t]*(?:import|export)\s+(?:type\s+)?(?:[^'";]*?\sfrom\s+)?['"]([^'"]+)['"]/gm,
    /\bimport\(\s*['"]([^'"]+)['"]\s*\)/g,
    /\brequire\(\s*['"]([^'"]+)['"]\s*\)/g,
  ];
  return patterns.flatMap((re) => [...source.matchAll(re)].map((m) => m[1]));
}

function sourcesUnder(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) return sourcesUnder(p);
    return e.name.endsWith('.ts') ? [p] : [];
  });
}

/**
 * Where a specifier leads, as a layer name: a folder of src/core ('forest'), a file directly in src/core
 * ('atomic.ts'), another part of the repository ('src/extension'), or the package itself ('vscode').
 */
function layerOf(fromFile: string, specifier: string): string {
  if (!specifier.startsWith('.')) return specifier.startsWith('node:') ? 'node' : specifier;
  const target = path.resolve(path.dirname(fromFile), specifier);
  const inCore = path.relative(core, target).split(path.sep);
  if (inCore[0] !== '..') return inCore.length > 1 || statSync(target, { throwIfNoEntry: false })?.isDirectory() ? inCore[0] : `${inCore[0]}.ts`;
  const inRepo = path.relative(root, target).split(path.sep);
  return inRepo[0] === 'src' ? `src/${inRepo[1]}` : inRepo[0];
}

interface Edge {
  readonly from: string;
  readonly to: string;
  readonly file: string;
  readonly specifier: string;
}

function coreEdges(): Edge[] {
  return sourcesUnder(core).flatMap((file) => {
    // A folder of src/core, or a file directly in it ('atomic.ts').
    const from = path.relative(core, file).split(path.sep)[0];
    return importsOf(readFileSync(file, 'utf8')).map((specifier) => ({ from, to: layerOf(file, specifier), file: path.relative(root, file), specifier }));
  });
}

/** One loop in a directed graph, as the nodes round it (first repeated at the end), or undefined when there is none. */
function findCycle(graph: ReadonlyMap<string, ReadonlySet<string>>): string[] | undefined {
  const state = new Map<string, 'open' | 'done'>();
  const trail: string[] = [];
  const visit = (node: string): string[] | undefined => {
    if (state.get(node) === 'done') return undefined;
    if (state.get(node) === 'open') return [...trail.slice(trail.indexOf(node)), node];
    state.set(node, 'open');
    trail.push(node);
    for (const next of graph.get(node) ?? []) {
      const loop = visit(next);
      if (loop) return loop;
    }
    trail.pop();
    state.set(node, 'done');
    return undefined;
  };
  for (const node of graph.keys()) {
    const loop = visit(node);
    if (loop) return loop;
  }
  return undefined;
}

const describeEdges = (edges: Edge[]) => edges.map((e) => `${e.file} imports '${e.specifier}'`).join('\n');

describe('src/core layering', () => {
  const edges = coreEdges();
  const folders = new Set(readdirSync(core, { withFileTypes: true }).filter((e) => e.isDirectory()).map((e) => e.name));

  it('reads every form of import the sources use', () => {
    const sample = [
      "import * as fs from 'node:fs';",
      "import type { A } from './a';",
      'import {\n  b,\n  type C,\n} from "../b";',
      "import './side-effect';",
      "export { d } from './d';",
      "export * from './e';",
      "const f = await import('./f');",
      "const g = require('./g');",
      "const text = 'not from here';",
    ].join('\n');
    assert.deepEqual(importsOf(sample).sort(), ['../b', './a', './d', './e', './f', './g', './side-effect', 'node:fs']);
    assert.ok(edges.some((e) => e.file === path.join('src', 'core', 'forest', 'fit.ts') && e.to === 'tree'), 'the fit grows trees: forest/fit.ts imports tree/');
  });

  it('finds a loop between folders when there is one, and none in a graph without', () => {
    const graph = (pairs: Array<[string, string]>) => {
      const g = new Map<string, Set<string>>();
      for (const [a, b] of pairs) g.set(a, (g.get(a) ?? new Set<string>()).add(b));
      return g;
    };
    assert.deepEqual(findCycle(graph([['a', 'b'], ['b', 'c'], ['c', 'a'], ['c', 'd']])), ['a', 'b', 'c', 'a']);
    assert.equal(findCycle(graph([['a', 'b'], ['b', 'c'], ['a', 'c'], ['d', 'c']])), undefined);
  });

  it('imports nothing from vscode, the editor, the command line, the panel or the protocol', () => {
    const upward = edges.filter((e) => ['vscode', 'src/extension', 'src/cli', 'src/protocol', 'webview'].includes(e.to));
    assert.equal(describeEdges(upward), '');
  });

  it('keeps base/, data/ and tree/ below the forest, the model file, explanations and ONNX', () => {
    // What each low layer may import from within src/core (besides itself): base/ is the bottom.
    const allowed: Record<string, readonly string[]> = { base: [], data: ['base'], tree: ['base', 'data'] };
    const wrong = edges.filter((e) => e.from in allowed && e.to !== e.from && (folders.has(e.to) || e.to.endsWith('.ts') || e.to.startsWith('src/')) && !allowed[e.from].includes(e.to));
    assert.equal(describeEdges(wrong), '');
  });

  it('has no import cycle between its folders', () => {
    const graph = new Map<string, Set<string>>();
    for (const e of edges) {
      if (e.from === e.to || !(folders.has(e.to) || e.to.endsWith('.ts'))) continue;
      graph.set(e.from, (graph.get(e.from) ?? new Set<string>()).add(e.to));
    }
    const loop = findCycle(graph);
    const along = loop ? edges.filter((e) => loop.some((node, i) => i > 0 && loop[i - 1] === e.from && node === e.to)) : [];
    assert.equal(loop, undefined, `${loop?.join(' -> ')}:\n${describeEdges(along)}`);
  });
});
