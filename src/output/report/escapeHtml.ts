/** Text for HTML or SVG (XML) content and quoted attribute values: & < > " ' become character references. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => HTML_REFERENCES[c]);
}

const HTML_REFERENCES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };
