// What every command gets: the context (state, settings, log) and the panel.

import type { CopseContext } from '../context';
import type { PanelHost } from '../panel/panelHost';

export interface Host {
  readonly ctx: CopseContext;
  readonly panel: PanelHost;
}

/** Command ids, as package.json contributes them. */
export const COMMANDS = {
  fit: 'copse.fit',
  openModel: 'copse.openModel',
  predictToFile: 'copse.predictToFile',
  saveModel: 'copse.saveModel',
  exportOnnx: 'copse.exportOnnx',
  showPanel: 'copse.showPanel',
  revealRow: 'copse.revealRow',
  showRowVotes: 'copse.showRowVotes',
  saveReport: 'copse.saveReport',
  openDemo: 'copse.openDemo',
} as const;
