/**
 * The few browser interfaces the report viewer uses, declared here so that the viewer type-checks
 * under the project's Node tsconfig (no DOM lib) as well as under tsconfig.browser.json (DOM lib).
 * `browser()` hands out the real globals, typed by these interfaces.
 */
export interface ViewerElement {
  textContent: string | null;
  hidden: boolean;
  readonly dataset: { [key: string]: string | undefined };
  readonly clientWidth: number;
  readonly clientHeight: number;
  getAttribute(name: string): string | null;
  setAttribute(name: string, value: string): void;
  addEventListener(type: string, listener: () => void): void;
  querySelectorAll(selector: string): ArrayLike<ViewerElement>;
}

export interface ViewerCanvas extends ViewerElement {
  width: number;
  height: number;
}

export interface ViewerDocument {
  readonly body: ViewerElement;
  getElementById(id: string): ViewerElement | null;
}

export interface ViewerWindow {
  readonly document: ViewerDocument;
  readonly devicePixelRatio?: number;
  requestAnimationFrame(callback: () => void): number;
  addEventListener(type: string, listener: () => void): void;
  atob(text: string): string;
}

/** The browser's globals, typed by the interfaces above. */
export function browser(): ViewerWindow {
  return globalThis as unknown as ViewerWindow;
}
