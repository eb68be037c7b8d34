// core/visible.ts: control characters from the data are shown as escapes in text for people.
import * as assert from 'node:assert/strict';
import { visible, visibleValue } from '../../src/core/visible';

describe('terminal-safe text (core/visible)', () => {
  it('escapes C0 controls but tab and line feed, DEL, C1 controls and bidirectional overrides', () => {
    assert.equal(visible('\x1b[31mred\x1b[0m'), '\\x1b[31mred\\x1b[0m');
    assert.equal(visible('\x1b]0;title\x07'), '\\x1b]0;title\\x07');
    assert.equal(visible('a\rb\x00c\x7fd\x9be'), 'a\\x0db\\x00c\\x7fd\\x9be');
    assert.equal(visible('abc\u202Efed\u2066x\u2069'), 'abc\\u202efed\\u2066x\\u2069');
    assert.equal(visible('tab\there\nnext line'), 'tab\there\nnext line');
  });

  it('leaves other text, accents and symbols alike, as it is', () => {
    const text = 'R² 0.91, Zürich, 東京, → ✓, "quoted" \\x1b written out';
    assert.equal(visible(text), text);
  });

  it('escapes line breaks too inside one value, so a value cannot start a line of its own', () => {
    assert.equal(visibleValue('two\nlines\tand \x1b'), 'two\\nlines\\tand \\x1b');
  });
});
