// The panel's HTML shell. Pure: the caller supplies webview URIs and the CSP source, so the policy is tested.

import { randomBytes } from 'node:crypto';

export interface PanelHtmlInput {
  readonly scriptUri: string;
  readonly styleUri: string;
  /** webview.cspSource: the origin VS Code serves local resources from. */
  readonly cspSource: string;
  readonly nonce?: string;
}

export function makeNonce(): string {
  return randomBytes(18).toString('base64').replace(/[+/=]/g, '');
}

/**
 * Only our bundled script (by nonce) runs; styles and fonts come from media/ alone; images may be data: URIs
 * (canvas exports). No network, no inline handlers, no eval.
 */
export function contentSecurityPolicy(cspSource: string, nonce: string): string {
  return [
    "default-src 'none'",
    `script-src 'nonce-${nonce}'`,
    `style-src ${cspSource}`,
    `font-src ${cspSource}`,
    `img-src ${cspSource} data:`,
  ].join('; ');
}

export function panelHtml(input: PanelHtmlInput): string {
  const nonce = input.nonce ?? makeNonce();
  const attr = (s: string): string => s.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${attr(contentSecurityPolicy(input.cspSource, nonce))}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<link rel="stylesheet" href="${attr(input.styleUri)}">
<title>Copse</title>
</head>
<body>
<script nonce="${nonce}" src="${attr(input.scriptUri)}"></script>
</body>
</html>`;
}
