// Bundles the panel webview into media/panel.js + media/panel.css. Plain CommonJS so the extension's
// own build (or a test) can `require('./webview/build.js').buildPanel()` without a TypeScript step.
'use strict';
const path = require('node:path');
const esbuild = require('esbuild');

const root = path.resolve(__dirname, '..');

/** @param {{ minify?: boolean, sourcemap?: boolean }} [options] */
async function buildPanel(options = {}) {
  const minify = options.minify ?? false;
  const sourcemap = options.sourcemap ?? !minify;
  const common = { bundle: true, minify, sourcemap, logLevel: 'warning', legalComments: 'none' };
  await Promise.all([
    esbuild.build({
      ...common,
      entryPoints: [path.join(__dirname, 'main.ts')],
      outfile: path.join(root, 'media', 'panel.js'),
      format: 'iife',
      platform: 'browser',
      // VS Code's webview is a current Chromium.
      target: 'chrome120',
      tsconfig: path.join(__dirname, 'tsconfig.json'),
    }),
    esbuild.build({
      ...common,
      entryPoints: [path.join(__dirname, 'panel.css')],
      outfile: path.join(root, 'media', 'panel.css'),
    }),
  ]);
  return { js: path.join(root, 'media', 'panel.js'), css: path.join(root, 'media', 'panel.css') };
}

module.exports = { buildPanel };

if (require.main === module) {
  buildPanel({ minify: process.argv.includes('--minify') }).catch((err) => {
    console.error(err instanceof Error ? err.message : err);
    process.exitCode = 1;
  });
}
