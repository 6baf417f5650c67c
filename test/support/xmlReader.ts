/**
 * A very small XML reader for tests, written from the XML 1.0 recommendation (elements, attributes
 * in double or single quotes, character data, comments, the XML declaration; the five predefined
 * entities): enough to read back what the exporters write, independent of the project's own code.
 */
export interface XmlElement {
  readonly name: string;
  readonly attrs: Readonly<Record<string, string>>;
  readonly children: XmlElement[];
  text: string;
}

const ENTITIES: Record<string, string> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'" };
const decode = (s: string): string => s.replace(/&(amp|lt|gt|quot|apos);/g, (_m, e: string) => ENTITIES[e]);

/** Parses a document into its root element; throws on mismatched or unclosed tags. */
export function parseXml(text: string): XmlElement {
  const stack: XmlElement[] = [];
  let root: XmlElement | null = null;
  let i = 0;
  while (i < text.length) {
    const lt = text.indexOf("<", i);
    const chunk = text.slice(i, lt < 0 ? text.length : lt);
    if (stack.length > 0) stack[stack.length - 1].text += decode(chunk);
    else if (chunk.trim() !== "") throw new Error(`text outside the root element at ${i}`);
    if (lt < 0) break;
    if (text.startsWith("<!--", lt)) { const e = text.indexOf("-->", lt); if (e < 0) throw new Error("unclosed comment"); i = e + 3; continue; }
    if (text.startsWith("<?", lt)) { const e = text.indexOf("?>", lt); if (e < 0) throw new Error("unclosed declaration"); i = e + 2; continue; }
    const gt = text.indexOf(">", lt);
    if (gt < 0) throw new Error(`unclosed tag at ${lt}`);
    const body = text.slice(lt + 1, gt);
    i = gt + 1;
    if (body.startsWith("/")) {
      const name = body.slice(1).trim();
      const top = stack.pop();
      if (top === undefined || top.name !== name) throw new Error(`mismatched </${name}>`);
      continue;
    }
    const selfClosing = body.endsWith("/");
    const m = /^([A-Za-z_][\w.:-]*)([\s\S]*?)\/?$/.exec(body);
    if (m === null) throw new Error(`bad tag <${body}>`);
    const attrs: Record<string, string> = {};
    for (const a of m[2].matchAll(/([A-Za-z_][\w.:-]*)\s*=\s*("([^"]*)"|'([^']*)')/g)) attrs[a[1]] = decode(a[3] ?? a[4]);
    const el: XmlElement = { name: m[1], attrs, children: [], text: "" };
    if (stack.length > 0) stack[stack.length - 1].children.push(el);
    else if (root === null) root = el;
    else throw new Error("two root elements");
    if (!selfClosing) stack.push(el);
  }
  if (stack.length > 0) throw new Error(`unclosed <${stack[stack.length - 1].name}>`);
  if (root === null) throw new Error("no root element");
  return root;
}

/** The first descendant (depth-first) named `name`, or null. */
export function find(el: XmlElement, name: string): XmlElement | null {
  for (const c of el.children) {
    if (c.name === name) return c;
    const d = find(c, name);
    if (d !== null) return d;
  }
  return null;
}
