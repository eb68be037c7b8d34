#!/usr/bin/env node
'use strict';
// The command line runs from the compiled output, which `npm install` builds (the "prepare" script).
// `copse ... | head` closes stdout early; that ends the command quietly rather than with a stack. Any other
// failure to write standard output (a full disk behind a redirection) is one sentence and exit code 1.
process.stdout.on('error', (e) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  const { reasonOf } = require('../out/src/core/file-errors.js');
  process.stderr.write(`copse: Could not write standard output: ${reasonOf(e)}.\n`);
  process.exit(1);
});
require('../out/src/cli/main.js')
  .main(process.argv.slice(2))
  .then((code) => {
    process.exitCode = code;
  });
