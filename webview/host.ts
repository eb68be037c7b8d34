// The panel's end of the boundary: every outgoing message is checked against the shared protocol
// before it leaves, and state goes through VS Code's per-webview store so a reload restores it.
import { isPanelState, isPanelToHost, type PanelState, type PanelToHost } from '../src/protocol/messages';

interface VsCodeApi {
  postMessage(message: unknown): void;
  getState(): unknown;
  setState(state: unknown): void;
}

declare function acquireVsCodeApi(): VsCodeApi;

// acquireVsCodeApi may only be called once per page load.
const api: VsCodeApi = acquireVsCodeApi();

export function post(message: PanelToHost): void {
  if (!isPanelToHost(message)) {
    // eslint-disable-next-line no-console -- the webview's developer console is the only log a panel has.
    console.error('copse panel: refusing to send a malformed message', message);
    return;
  }
  api.postMessage(message);
}

export function loadState(): PanelState | null {
  const s = api.getState();
  return isPanelState(s) ? s : null;
}

export function saveState(state: PanelState): void {
  api.setState(state);
}
