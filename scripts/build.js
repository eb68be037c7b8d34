#!/usr/bin/env node
'use strict';
// Bundles what the extension package ships, with esbuild:
//   dist/extension.js      the extension host client (vscode stays external: the workbench provides it)
//   dist/<name>-worker.js  every worker entry in src/core and src/extension/workers, next to the bundles that
//                          start them, because each loads path.join(__dirname, '<name>-worker.js') at run time
//   dist/cli.js            the command line, when src/cli/main.ts exists (run as `node dist/cli.js`)
//   dist/icon.png          the marketplace icon, drawn here so no binary lives in git
//   media/panel.js/.css    the webview, via webview/build.js
//
// usage: node scripts/build.js [--production]   (--production minifies and drops source maps)

const fs = require('node:fs');
const path = require('node:path');
const zlib = require('node:zlib');
const esbuild = require('esbuild');

const root = path.resolve(__dirname, '..');
const defaultDist = path.join(root, 'dist');

/**
 * Every `*-worker.ts` under src/core and src/extension/workers (the editor's own explanation thread), so a
 * worker added later is bundled without editing this file.
 */
function workerEntries() {
  const found = [];
  const walk = (dir) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const p = path.join(dir, e.name);
      if (e.isDirectory()) walk(p);
      else if (/-worker\.ts$/.test(e.name)) found.push(p);
    }
  };
  walk(path.join(root, 'src', 'core'));
  const editorWorkers = path.join(root, 'src', 'extension', 'workers');
  if (fs.existsSync(editorWorkers)) walk(editorWorkers);
  return found.sort();
}

async function bundleNode(production, dist) {
  const common = {
    bundle: true,
    platform: 'node',
    format: 'cjs',
    target: 'node20',
    minify: production,
    sourcemap: production ? false : 'linked',
    logLevel: 'warning',
    legalComments: 'none',
    tsconfig: path.join(root, 'tsconfig.json'),
  };
  const jobs = [];
  const outputs = [];
  const add = (entry, outName, extra = {}) => {
    const outfile = path.join(dist, outName);
    outputs.push(outfile);
    jobs.push(esbuild.build({ ...common, entryPoints: [entry], outfile, ...extra }));
  };
  add(path.join(root, 'src', 'extension', 'extension.ts'), 'extension.js', { external: ['vscode'] });
  const names = new Set();
  for (const w of workerEntries()) {
    const name = path.basename(w, '.ts') + '.js';
    if (names.has(name)) throw new Error(`Two worker entries would both become dist/${name}; rename one.`);
    names.add(name);
    add(w, name);
  }
  const cli = path.join(root, 'src', 'cli', 'main.ts');
  if (fs.existsSync(cli)) {
    // main.ts exports main(argv) and leaves running it to its caller (bin/copse.js does the same).
    const outfile = path.join(dist, 'cli.js');
    outputs.push(outfile);
    jobs.push(
      esbuild.build({
        ...common,
        stdin: {
          contents: "import { main } from './main';\nvoid main(process.argv.slice(2)).then((code) => { process.exitCode = code; });\n",
          resolveDir: path.dirname(cli),
          sourcefile: 'cli-entry.ts',
          loader: 'ts',
        },
        outfile,
        banner: { js: '#!/usr/bin/env node' },
      }),
    );
  }
  await Promise.all(jobs);
  return outputs;
}

// ---------------------------------------------------------------------------------------------
// The icon: three stylised trees of different heights on a rounded tile, rendered at 4x and averaged
// down so edges are smooth, then written as an RGBA PNG (PNG spec, W3C 2003: IHDR, IDAT, IEND chunks).

function drawIcon(size = 128) {
  const S = 4;
  const W = size * S;
  const px = new Float64Array(W * W * 4);
  const tile = [0x1f, 0x3a, 0x2e];
  const trees = [
    { cx: 0.3, top: 0.3, base: 0.72, half: 0.16, colour: [0x5f, 0xb8, 0x78] },
    { cx: 0.7, top: 0.34, base: 0.74, half: 0.15, colour: [0x4a, 0x9e, 0x66] },
    { cx: 0.5, top: 0.16, base: 0.78, half: 0.2, colour: [0x8c, 0xd6, 0x9a] },
  ];
  const trunk = [0x8a, 0x6a, 0x4a];
  const r = 0.18;
  const inTile = (x, y) => {
    const dx = Math.max(r - x, 0, x - (1 - r));
    const dy = Math.max(r - y, 0, y - (1 - r));
    return dx * dx + dy * dy <= r * r;
  };
  for (let j = 0; j < W; j++) {
    for (let i = 0; i < W; i++) {
      const x = (i + 0.5) / W;
      const y = (j + 0.5) / W;
      if (!inTile(x, y)) continue;
      let c = tile;
      for (const t of trees) {
        if (Math.abs(x - t.cx) < 0.025 && y > t.base - 0.02 && y < t.base + 0.08) c = trunk;
        const h = (y - t.top) / (t.base - t.top);
        if (h >= 0 && h <= 1 && Math.abs(x - t.cx) <= t.half * h) c = t.colour;
      }
      const o = (j * W + i) * 4;
      px[o] = c[0];
      px[o + 1] = c[1];
      px[o + 2] = c[2];
      px[o + 3] = 255;
    }
  }
  const raw = Buffer.alloc(size * (size * 4 + 1));
  for (let y = 0; y < size; y++) {
    raw[y * (size * 4 + 1)] = 0; // filter: none
    for (let x = 0; x < size; x++) {
      const acc = [0, 0, 0, 0];
      for (let sy = 0; sy < S; sy++) {
        for (let sx = 0; sx < S; sx++) {
          const o = ((y * S + sy) * W + (x * S + sx)) * 4;
          const a = px[o + 3];
          acc[0] += px[o] * a;
          acc[1] += px[o + 1] * a;
          acc[2] += px[o + 2] * a;
          acc[3] += a;
        }
      }
      const o = y * (size * 4 + 1) + 1 + x * 4;
      const alpha = acc[3] / (S * S);
      raw[o] = acc[3] ? Math.round(acc[0] / acc[3]) : 0;
      raw[o + 1] = acc[3] ? Math.round(acc[1] / acc[3]) : 0;
      raw[o + 2] = acc[3] ? Math.round(acc[2] / acc[3]) : 0;
      raw[o + 3] = Math.round(alpha);
    }
  }
  const crcTable = Array.from({ length: 256 }, (_, n) => {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    return c >>> 0;
  });
  const crc = (buf) => {
    let c = 0xffffffff;
    for (const b of buf) c = crcTable[(c ^ b) & 0xff] ^ (c >>> 8);
    return (c ^ 0xffffffff) >>> 0;
  };
  const chunk = (type, data) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
    const sum = Buffer.alloc(4);
    sum.writeUInt32BE(crc(body));
    return Buffer.concat([len, body, sum]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0);
  ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 6; // colour type: RGBA
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', zlib.deflateSync(raw, { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

/**
 * `outDir` and `panel: false` let a test bundle into a scratch folder without touching dist/ or media/.
 * @param {{ production?: boolean, outDir?: string, panel?: boolean, quiet?: boolean }} [options]
 */
async function build({ production = false, outDir = defaultDist, panel = true, quiet = false } = {}) {
  const dist = outDir;
  fs.rmSync(dist, { recursive: true, force: true });
  fs.mkdirSync(dist, { recursive: true });
  const started = Date.now();
  const outputs = await bundleNode(production, dist);
  fs.writeFileSync(path.join(dist, 'icon.png'), drawIcon());
  const files = [...outputs, path.join(dist, 'icon.png')];
  if (panel) {
    const { buildPanel } = require(path.join(root, 'webview', 'build.js'));
    const built = await buildPanel({ minify: production, sourcemap: !production });
    files.push(built.js, built.css);
  }
  if (quiet) return files;
  for (const f of files) {
    console.log(`  ${path.relative(root, f).padEnd(28)} ${(fs.statSync(f).size / 1024).toFixed(1).padStart(8)} KB`);
  }
  console.log(`built in ${((Date.now() - started) / 1000).toFixed(1)} s${production ? ' (production)' : ''}`);
  return files;
}

module.exports = { build, drawIcon, workerEntries };

if (require.main === module) {
  build({ production: process.argv.includes('--production') }).catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exitCode = 1;
  });
}
