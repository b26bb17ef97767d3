/**
 * Values from people (job names, user names, company names) end up in mail headers and HTML.
 * Headers: every control character, CR and LF included, becomes a space, so no value can start
 * a header of its own (`\r\nBcc: ...`). HTML: every value is escaped.
 */

// eslint-disable-next-line no-control-regex
const CONTROL = /[\u0000-\u001F\u007F-\u009F\u2028\u2029]+/g;

export function headerSafe(value: string, max = 200): string {
  return value.replace(CONTROL, ' ').replace(/\s{2,}/g, ' ').trim().slice(0, max);
}

const HTML_ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]!);
}
