// The repo compiles with lib ES2022 only, and adding the DOM lib would put
// browser globals into every file of the build, src/core included. Functions
// that run inside the page (evaluate callbacks) are typed with this small
// stand-in instead; they can only use what it declares.

export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface BrowserElement {
  readonly className: string;
  readonly textContent: string | null;
  readonly innerText: string;
  readonly parentElement: BrowserElement | null;
  readonly firstElementChild: BrowserElement | null;
  readonly style: { top: string };
  readonly classList: { contains(name: string): boolean };
  getAttribute(name: string): string | null;
  getBoundingClientRect(): Box;
  querySelector(selector: string): BrowserElement | null;
  querySelectorAll(selector: string): ArrayLike<BrowserElement> & Iterable<BrowserElement>;
}
