#!/usr/bin/env node
'use strict';
// The command line runs from the compiled output, which `npm install` builds (the "prepare" script).
// `copse ... | head` closes stdout early; that ends the command quietly rather than with a stack.
process.stdout.on('error', (e) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw e;
});
require('../out/src/cli/main.js')
  .main(process.argv.slice(2))
  .then((code) => {
    process.exitCode = code;
  });
