#!/usr/bin/env node
'use strict';
// The command line runs from the compiled output; `npm install` builds it (see "prepare").
require('../out/src/cli/main.js');
