#!/usr/bin/env node
'use strict';
// Writes test/fixtures/open/friedman1.csv: the first benchmark function of
// Friedman, J. H. (1991) "Multivariate Adaptive Regression Splines", Annals of Statistics 19(1), 1-67:
//   y = 10 sin(pi x1 x2) + 20 (x3 - 0.5)^2 + 10 x4 + 5 x5 + e,  x ~ U[0,1]^10,  e ~ N(0, 1).
// x6..x10 do not enter y, which is what makes it useful: a forest's importances must rank them last.
// Seeded so the committed CSV is reproducible byte for byte; re-run and `git diff` to check.
//
// usage: node scripts/make-friedman1.js [--rows N] [--seed TEXT] [--out FILE]

const fs = require('fs');
const path = require('path');
const seedrandom = require('seedrandom');

function parseArgs(argv) {
  const opts = { rows: 1000, seed: 'copse-friedman1', out: path.join(__dirname, '..', 'test', 'fixtures', 'open', 'friedman1.csv') };
  for (let i = 0; i < argv.length; i += 2) {
    const key = argv[i];
    const value = argv[i + 1];
    if (value === undefined) throw new Error(`${key} needs a value`);
    if (key === '--rows') opts.rows = Number(value);
    else if (key === '--seed') opts.seed = value;
    else if (key === '--out') opts.out = value;
    else throw new Error(`unknown option ${key}`);
  }
  if (!Number.isInteger(opts.rows) || opts.rows < 1) throw new Error('--rows must be a positive whole number');
  return opts;
}

function friedman1(rows, seed) {
  const rng = seedrandom(seed);
  // Box-Muller; the spare deviate is kept so each call costs one uniform pair per two normals.
  let spare = null;
  const normal = () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u === 0) u = rng();
    const v = rng();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
  const lines = ['x1,x2,x3,x4,x5,x6,x7,x8,x9,x10,y'];
  for (let i = 0; i < rows; i++) {
    // Rounded before y is computed, so y is exactly the function of the x the file holds (plus noise).
    const x = Array.from({ length: 10 }, () => Number(rng().toFixed(6)));
    const y = 10 * Math.sin(Math.PI * x[0] * x[1]) + 20 * (x[2] - 0.5) ** 2 + 10 * x[3] + 5 * x[4] + normal();
    lines.push(x.join(',') + ',' + y.toFixed(6));
  }
  return lines.join('\n') + '\n';
}

if (require.main === module) {
  const opts = parseArgs(process.argv.slice(2));
  fs.mkdirSync(path.dirname(opts.out), { recursive: true });
  fs.writeFileSync(opts.out, friedman1(opts.rows, opts.seed));
  process.stderr.write(`wrote ${opts.out}: ${opts.rows} rows, seed "${opts.seed}"\n`);
}

module.exports = { friedman1 };
