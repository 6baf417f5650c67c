/**
 * Where a JSON text stops being valid: a small recursive-descent check of the grammar of RFC 8259
 * (https://www.rfc-editor.org/rfc/rfc8259), used only after JSON.parse has failed, because Node 20's
 * messages do not always give a position. Returns the 1-based line and the offending character
 * ("end of input" at the end), or null when the text is valid after all.
 */
export function jsonErrorAt(text: string): { line: number; found: string } | null {
  let i = 0;
  const fail = (): never => {
    throw new Error("json");
  };
  const ws = (): void => {
    while (i < text.length && (text[i] === " " || text[i] === "\t" || text[i] === "\n" || text[i] === "\r")) ++i;
  };
  const lit = (word: string): void => {
    if (text.startsWith(word, i)) i += word.length;
    else fail();
  };
  const str = (): void => {
    if (text[i] !== '"') fail();
    ++i;
    for (;;) {
      if (i >= text.length) fail();
      const c = text.charCodeAt(i);
      if (c === 0x22) { ++i; return; }
      if (c < 0x20) fail();
      if (c === 0x5c) {
        const e = text[i + 1];
        if (e === "u") {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) { i += 2; fail(); }
          i += 6;
        } else if (e !== undefined && '"\\/bfnrt'.includes(e)) i += 2;
        else { ++i; fail(); }
      } else ++i;
    }
  };
  const num = (): void => {
    const m = /^-?(?:0|[1-9]\d*)(?:\.\d+)?(?:[eE][+-]?\d+)?/.exec(text.slice(i, i + 400));
    if (m === null) fail();
    i += m![0].length;
  };
  const value = (): void => {
    ws();
    const c = text[i];
    if (c === "{") {
      ++i; ws();
      if (text[i] === "}") { ++i; return; }
      for (;;) {
        ws(); str(); ws();
        if (text[i] !== ":") fail();
        ++i; value(); ws();
        if (text[i] === ",") { ++i; continue; }
        if (text[i] === "}") { ++i; return; }
        fail();
      }
    } else if (c === "[") {
      ++i; ws();
      if (text[i] === "]") { ++i; return; }
      for (;;) {
        value(); ws();
        if (text[i] === ",") { ++i; continue; }
        if (text[i] === "]") { ++i; return; }
        fail();
      }
    } else if (c === '"') str();
    else if (c === "t") lit("true");
    else if (c === "f") lit("false");
    else if (c === "n") lit("null");
    else num();
  };
  try {
    if (text.charCodeAt(0) === 0xfeff) i = 1;
    value();
    ws();
    if (i < text.length) fail();
    return null;
  } catch {
    const line = text.slice(0, i).split(/\r\n|\r|\n/).length;
    return { line, found: i < text.length ? JSON.stringify(text[i]) : "end of input" };
  }
}
