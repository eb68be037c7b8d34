// The panel's webview type: the serializer, the activation event and createWebviewPanel must agree on it.
export const PANEL_VIEW_TYPE_ID = 'copse.panel';
