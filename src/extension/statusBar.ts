// The status bar item naming the active forest; clicking it reveals the panel.

import * as vscode from 'vscode';
import type { CopseContext } from './context';
import { statusText } from './statusText';

export function registerStatusBar(ctx: CopseContext): void {
  const item = ctx.track(vscode.window.createStatusBarItem('copse.activeForest', vscode.StatusBarAlignment.Right, 100));
  item.name = 'Copse: active forest';
  item.command = 'copse.showPanel';
  ctx.track(
    ctx.onDidChangeSession((session) => {
      if (!session) {
        item.hide();
        return;
      }
      const { text, tooltip } = statusText(session.summary);
      item.text = text;
      item.tooltip = tooltip;
      item.show();
    }),
  );
}
