/**
 * "save SVG" and "save PNG" buttons under each plot of the report (browser code, bundled into the
 * viewer script). The SVG is the plot's own markup with the page's `svg ...` style rules copied in,
 * so it looks the same on its own; the PNG is that SVG drawn on a canvas at twice the size on white.
 * Both are handed over as data: URLs through a download link: nothing leaves the page, no network.
 */

interface El {
  readonly dataset: { [key: string]: string | undefined };
  getAttribute(name: string): string | null;
  setAttribute(name: string, value: string): void;
  addEventListener(type: string, listener: () => void): void;
  cloneNode(deep: boolean): El;
  insertBefore(node: El, ref: El | null): void;
  readonly firstChild: El | null;
  textContent: string | null;
  click(): void;
  remove(): void;
}
interface Img { src: string; width: number; height: number; decode(): Promise<void> }
interface Ctx { fillStyle: string; fillRect(x: number, y: number, w: number, h: number): void; drawImage(i: Img, x: number, y: number, w: number, h: number): void }
interface Canvas { width: number; height: number; getContext(kind: "2d"): Ctx | null; toDataURL(type: string): string }
interface Page {
  readonly document: {
    readonly body: { appendChild(e: El): void; dataset: { [key: string]: string | undefined } };
    readonly styleSheets: ArrayLike<{ readonly cssRules: ArrayLike<{ readonly cssText: string }> }>;
    getElementById(id: string): El | null;
    querySelectorAll(selector: string): ArrayLike<El>;
    createElement(tag: string): El;
    createElementNS(ns: string, tag: string): El;
  };
  readonly Image: new () => Img;
  XMLSerializer: new () => { serializeToString(node: El): string };
}

const SVG_NS = "http://www.w3.org/2000/svg";

/** The plot `id` as standalone SVG text (with the page's svg style rules). */
function svgText(w: Page, id: string): string | null {
  const plot = w.document.getElementById(id);
  if (plot === null) return null;
  const copy = plot.cloneNode(true);
  const rules: string[] = [];
  for (const sheet of Array.from(w.document.styleSheets)) for (const r of Array.from(sheet.cssRules)) if (r.cssText.startsWith("svg")) rules.push(r.cssText);
  const style = w.document.createElementNS(SVG_NS, "style");
  // the page's rules target "svg .x" and "svg.plot": inside the file the root is that svg
  style.textContent = `svg { font: 11px "DejaVu Sans", system-ui, sans-serif; background: #fff; }\n${rules.join("\n")}`;
  copy.insertBefore(style, copy.firstChild);
  return `<?xml version="1.0" encoding="UTF-8"?>\n${new w.XMLSerializer().serializeToString(copy)}`;
}

function download(w: Page, url: string, name: string): void {
  const a = w.document.createElement("a");
  a.setAttribute("href", url);
  a.setAttribute("download", name);
  w.document.body.appendChild(a);
  a.click();
  a.remove();
}

/** Wires every `[data-save]` button of the page. */
export function setUpSaveButtons(): void {
  const w = globalThis as unknown as Page;
  for (const b of Array.from(w.document.querySelectorAll("button[data-save]"))) {
    b.addEventListener("click", () => {
      const id = b.dataset.save ?? "";
      const svg = svgText(w, id);
      if (svg === null) return;
      const url = `data:image/svg+xml;charset=utf-8,${encodeURIComponent(svg)}`;
      if (b.dataset.as === "svg") {
        download(w, url, `${id}.svg`);
        return;
      }
      const img = new w.Image();
      img.src = url;
      void img.decode().then(() => {
        const c = w.document.createElement("canvas") as unknown as Canvas;
        c.width = 2 * img.width; c.height = 2 * img.height;
        const g = c.getContext("2d");
        if (g === null) return;
        g.fillStyle = "#ffffff";
        g.fillRect(0, 0, c.width, c.height);
        g.drawImage(img, 0, 0, c.width, c.height);
        download(w, c.toDataURL("image/png"), `${id}.png`);
      });
    });
  }
  w.document.body.dataset.saveReady = "1";
}
