// What users read when a command fails.
import * as assert from 'node:assert/strict';
import { loadCsvText } from '../../src/core/csv/load';
import { isAbort, isUserError, userMessage } from '../../src/extension/errors';

describe('extension error messages', () => {
  it('shows a malformed CSV\'s DataError as core wrote it, naming the line', async () => {
    const e = await loadCsvText('a,b\n1,2\n3\n', {}, 'bad.csv').then(() => undefined, (x: unknown) => x);
    assert.ok(e instanceof Error && e.name === 'DataError');
    assert.ok(isUserError(e));
    assert.equal(userMessage(e), e.message);
    assert.match(userMessage(e), /bad\.csv line 3/);
  });

  it('marks other failures as unexpected and points at the log', () => {
    assert.match(userMessage(new TypeError('x is undefined')), /^Copse hit an unexpected error: x is undefined \(details in the Copse output\)\.$/);
    assert.equal(isUserError(new TypeError('x')), false);
    const missing = Object.assign(new Error('ENOENT: no such file'), { code: 'ENOENT', path: '/tmp/nope.csv' });
    assert.equal(userMessage(missing), 'File not found: /tmp/nope.csv');
  });

  it('recognises cancellation from an AbortController, as core raises it', () => {
    assert.ok(isAbort(new DOMException('stop', 'AbortError')));
    assert.ok(isAbort(Object.assign(new Error('The fit was cancelled.'), { name: 'AbortError' })));
    assert.equal(isAbort(new Error('other')), false);
  });
});
