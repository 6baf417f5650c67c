const ENTITIES: Readonly<Record<string, string>> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

/**
 * Escapes text for HTML element content and quoted attribute values: & < > " ' become entities.
 * Every string that came from a file (names, diagnostics, warnings) goes through this before it
 * enters the report. See https://html.spec.whatwg.org/multipage/syntax.html#character-references.
 * @example escapeHtml('<script>alert("x")</script>') // "&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;"
 */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ENTITIES[c]);
}

/**
 * JSON for a `<script type="application/json">` block: every "<" becomes \u003c (so neither
 * "</script" nor "<!--" can appear), and U+2028/U+2029 are escaped too. JSON.parse reads it back unchanged.
 * @example scriptJson({ f: "</script>" }) // '{"f":"\\u003c/script>"}'
 */
export function scriptJson(value: unknown): string {
  return JSON.stringify(value).replace(/</g, "\\u003c").replace(/\u2028/g, "\\u2028").replace(/\u2029/g, "\\u2029");
}

/**
 * Script text made safe to inline in `<script>...</script>`: "</script" becomes "<\/script" and
 * "<!--" becomes "<\!--" (both mean the same inside JavaScript strings and regular expressions).
 */
export function inlineScript(js: string): string {
  return js.replace(/<\/(script)/gi, "<\\/$1").replace(/<!--/g, "<\\!--");
}
