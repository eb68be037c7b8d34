// The only way the panel makes elements. Text always lands through text nodes, so a column name or
// label that contains markup shows as characters; there is deliberately no HTML-string path here.

export type Child = Node | string | number | null | undefined | false;

export interface Props {
  class?: string;
  testid?: string;
  title?: string;
  /** Set with setAttribute: attribute values are never parsed as markup. */
  attrs?: Record<string, string>;
  on?: { [K in keyof HTMLElementEventMap]?: (ev: HTMLElementEventMap[K]) => void };
}

export function h<K extends keyof HTMLElementTagNameMap>(tag: K, props: Props = {}, ...children: Child[]): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  decorate(el, props);
  append(el, ...children);
  return el;
}

/** Custom elements (vscode-*) by tag name. */
export function custom(tag: string, props: Props = {}, ...children: Child[]): HTMLElement {
  const el = document.createElement(tag);
  decorate(el, props);
  append(el, ...children);
  return el;
}

function decorate(el: HTMLElement, props: Props): void {
  if (props.class) el.className = props.class;
  if (props.testid) el.dataset.testid = props.testid;
  if (props.title) el.title = props.title;
  if (props.attrs) for (const [k, v] of Object.entries(props.attrs)) el.setAttribute(k, v);
  if (props.on) {
    for (const [k, fn] of Object.entries(props.on)) el.addEventListener(k, fn as EventListener);
  }
}

export function append(el: Node, ...children: Child[]): void {
  for (const c of children) {
    if (c === null || c === undefined || c === false) continue;
    el.appendChild(typeof c === 'string' || typeof c === 'number' ? document.createTextNode(String(c)) : c);
  }
}

export function clear(el: Node): void {
  while (el.firstChild) el.removeChild(el.firstChild);
}

export function section(testid: string, title: string, ...children: Child[]): HTMLElement {
  return h('section', { class: 'card', testid }, h('h2', {}, title), ...children);
}
