#!/usr/bin/env node
'use strict';
// The command line runs from the compiled output, which `npm install` builds (the "prepare" script).
require('../out/src/cli/main.js')
  .main(process.argv.slice(2))
  .then((code) => {
    process.exitCode = code;
  });
