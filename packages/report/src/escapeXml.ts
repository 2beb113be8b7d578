/**
 * Escape text for XML/HTML element content and attribute values (`&`, `<`, `>`, `"`, `'`).
 *
 * @param s - text
 * @returns escaped text
 * @example
 * escapeXml('a < b & "c"'); // => 'a &lt; b &amp; &quot;c&quot;'
 */
export function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}
