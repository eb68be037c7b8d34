// Runs inside VS Code's extension host: mocha over every *.suite.js beside this file.
import * as fs from 'node:fs';
import * as path from 'node:path';
import Mocha from 'mocha';

export function run(): Promise<void> {
  const mocha = new Mocha({ ui: 'bdd', timeout: 120_000, color: true });
  for (const f of fs.readdirSync(__dirname).filter((n) => n.endsWith('.suite.js')).sort()) mocha.addFile(path.join(__dirname, f));
  return new Promise((resolve, reject) => {
    mocha.run((failures) => (failures ? reject(new Error(`${failures} extension-host test(s) failed`)) : resolve()));
  });
}
