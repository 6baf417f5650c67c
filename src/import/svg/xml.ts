import { InputError } from "../../errors.js";

/** A start tag of the document: name, attributes (entities decoded), line, and whether it is empty (`/>`). */
export interface XmlStart {
  readonly kind: "start";
  readonly name: string;
  readonly attrs: ReadonlyMap<string, string>;
  readonly line: number;
  readonly empty: boolean;
}
export interface XmlEnd {
  readonly kind: "end";
  readonly name: string;
  readonly line: number;
}
export type XmlToken = XmlStart | XmlEnd;

const ENTITIES: Readonly<Record<string, string>> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'" };

function decode(value: string, file: string, line: number): string {
  return value.replace(/&(#x[0-9a-fA-F]+|#[0-9]+|[a-zA-Z]+);/g, (m, body: string) => {
    if (body.startsWith("#")) {
      const code = body.startsWith("#x") ? parseInt(body.slice(2), 16) : parseInt(body.slice(1), 10);
      // XML 1.0 Char production (https://www.w3.org/TR/xml/#NT-Char): no NUL, no surrogates, at most U+10FFFF
      const legal = code === 0x9 || code === 0xa || code === 0xd || (code >= 0x20 && code <= 0xd7ff) || (code >= 0xe000 && code <= 0xfffd) || (code >= 0x10000 && code <= 0x10ffff);
      if (!legal) throw new InputError(file, line, "xml", `character reference ${m.length > 24 ? `${m.slice(0, 20)}...` : m} is not a legal XML character (allowed up to U+10FFFF, no control characters or surrogates)`);
      return String.fromCodePoint(code);
    }
    const e = ENTITIES[body];
    if (e === undefined) throw new InputError(file, line, "xml", `unknown entity ${m}`);
    return e;
  });
}

/**
 * A small XML tokenizer, enough for SVG files (XML 1.0, https://www.w3.org/TR/xml/): start, empty
 * and end tags with quoted attributes; comments, CDATA, processing instructions, the DOCTYPE and
 * character data are skipped. Tags must nest properly. No namespaces are resolved (prefixes are
 * kept in names). Cost O(size).
 * @throws {InputError} "file:12: xml: unterminated comment", "file:30: xml: </g> closes <path> ...".
 */
export function tokenizeXml(text: string, file: string): XmlToken[] {
  const out: XmlToken[] = [];
  const stack: { name: string; line: number }[] = [];
  let i = 0, line = 1;
  const advance = (to: number) => {
    for (let k = i; k < to; k++) if (text.charCodeAt(k) === 10) line++;
    i = to;
  };
  const skipPast = (end: string, what: string) => {
    const j = text.indexOf(end, i);
    if (j === -1) throw new InputError(file, line, "xml", `unterminated ${what}`);
    advance(j + end.length);
  };
  while (i < text.length) {
    const lt = text.indexOf("<", i);
    if (lt === -1) break;
    advance(lt);
    if (text.startsWith("<!--", i)) skipPast("-->", "comment");
    else if (text.startsWith("<![CDATA[", i)) skipPast("]]>", "CDATA section");
    else if (text.startsWith("<?", i)) skipPast("?>", "processing instruction");
    else if (text.startsWith("<!", i)) {
      // DOCTYPE, possibly with an internal subset in brackets
      const start = line;
      let depth = 0, j = i + 2;
      for (; j < text.length; j++) {
        const c = text[j];
        if (c === "[") depth++;
        else if (c === "]") depth--;
        else if (c === ">" && depth <= 0) break;
      }
      if (j >= text.length) throw new InputError(file, start, "xml", "unterminated declaration");
      advance(j + 1);
    } else if (text.startsWith("</", i)) {
      const m = /^<\/([^\s>]+)\s*>/.exec(text.slice(i, i + 256));
      if (m === null) throw new InputError(file, line, "xml", "malformed end tag");
      const open = stack.pop();
      if (open === undefined) throw new InputError(file, line, "xml", `</${m[1]}> without a start tag`);
      if (open.name !== m[1]) throw new InputError(file, line, "xml", `</${m[1]}> closes <${open.name}> of line ${open.line}`);
      out.push({ kind: "end", name: m[1], line });
      advance(i + m[0].length);
    } else {
      const startLine = line;
      const nameMatch = /^<([A-Za-z_:][-A-Za-z0-9_:.]*)/.exec(text.slice(i, i + 256));
      if (nameMatch === null) throw new InputError(file, line, "xml", `malformed tag ${JSON.stringify(text.slice(i, i + 12))}`);
      const name = nameMatch[1];
      let j = i + nameMatch[0].length;
      const attrs = new Map<string, string>();
      let empty = false;
      for (;;) {
        while (j < text.length && /\s/.test(text[j])) j++;
        if (j >= text.length) throw new InputError(file, startLine, "xml", `unterminated tag <${name}>`);
        if (text[j] === ">") {
          j++;
          break;
        }
        if (text.startsWith("/>", j)) {
          empty = true;
          j += 2;
          break;
        }
        const am = /^([A-Za-z_:][-A-Za-z0-9_:.]*)\s*=\s*(["'])/.exec(text.slice(j, j + 256));
        if (am === null) throw new InputError(file, startLine, "xml", `malformed attribute in <${name}> near ${JSON.stringify(text.slice(j, j + 16))}`);
        const q = am[2];
        const vStart = j + am[0].length;
        const vEnd = text.indexOf(q, vStart);
        if (vEnd === -1) throw new InputError(file, startLine, "xml", `unterminated value of attribute ${am[1]} in <${name}>`);
        if (attrs.has(am[1])) throw new InputError(file, startLine, "xml", `attribute ${am[1]} repeated in <${name}>`);
        attrs.set(am[1], decode(text.slice(vStart, vEnd), file, startLine));
        j = vEnd + 1;
      }
      out.push({ kind: "start", name, attrs, line: startLine, empty });
      if (!empty) stack.push({ name, line: startLine });
      advance(j);
    }
  }
  const open = stack.pop();
  if (open !== undefined) throw new InputError(file, open.line, "xml", `<${open.name}> is never closed (truncated file?)`);
  return out;
}
