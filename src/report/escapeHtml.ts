/**
 * Escaping of text for HTML and SVG. Reference: WHATWG HTML Living Standard §13.1.2.6
 * ("Restrictions on the contents of raw text elements") and §13.1.2.3 (attributes); the five
 * characters below are the ones that can end text or an attribute value early.
 * Every string that reaches the report from input (titles, file names, settings) goes through here.
 */

const replacements: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/** Escapes `&`, `<`, `>`, `"` and `'` so the text is safe in element content and quoted attributes. */
export function escapeHtml(text: string): string {
  if (typeof text !== 'string') {
    throw new TypeError(`escapeHtml: text must be a string, received ${typeof text}`);
  }
  return text.replace(/[&<>"']/g, (c) => replacements[c]);
}

/**
 * Serialises data for a `<script type="application/json">` block: JSON with `<`, `>`, `&` and
 * the line separators U+2028/U+2029 written as \u escapes, so no `</script>` or `<!--` can appear.
 */
export function jsonForScript(value: unknown): string {
  return JSON.stringify(value)
    .replace(/</g, '\\u003c')
    .replace(/>/g, '\\u003e')
    .replace(/&/g, '\\u0026')
    .replace(/\u2028/g, '\\u2028')
    .replace(/\u2029/g, '\\u2029');
}
