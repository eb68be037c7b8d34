// The panel's HTML shell: a nonce CSP that lets only our bundle run.
import * as assert from 'node:assert/strict';
import { contentSecurityPolicy, makeNonce, panelHtml } from '../../src/extension/panel/html';

describe('extension panel html', () => {
  const html = panelHtml({
    scriptUri: 'https://file+.vscode-resource.vscode-cdn.net/ext/media/panel.js',
    styleUri: 'https://file+.vscode-resource.vscode-cdn.net/ext/media/panel.css',
    cspSource: 'https://*.vscode-cdn.net',
    nonce: 'abc123',
  });

  it('runs scripts by nonce only: no inline, no eval, nothing remote', () => {
    const csp = contentSecurityPolicy('https://*.vscode-cdn.net', 'abc123');
    assert.match(csp, /default-src 'none'/);
    assert.match(csp, /script-src 'nonce-abc123'(;|$)/);
    assert.doesNotMatch(csp, /unsafe-inline|unsafe-eval|\*;|https?:\/\/(?!\*\.vscode-cdn)/);
  });

  it('loads the bundle with that nonce and the stylesheet from media/', () => {
    assert.match(html, /<script nonce="abc123" src="[^"]*\/media\/panel\.js"><\/script>/);
    assert.match(html, /<link rel="stylesheet" href="[^"]*\/media\/panel\.css">/);
    assert.equal((html.match(/<script/g) ?? []).length, 1, 'one script, no inline code');
    assert.match(html, /http-equiv="Content-Security-Policy" content="default-src 'none'; script-src 'nonce-abc123'/);
  });

  it('makes a fresh, attribute-safe nonce each time', () => {
    const a = makeNonce();
    const b = makeNonce();
    assert.notEqual(a, b);
    assert.match(a, /^[A-Za-z0-9]{16,}$/);
  });
});
