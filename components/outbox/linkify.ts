// Splits message text into plain runs and web addresses, so links in e-mails (the invitation
// and password-reset links) can be shown as real, clickable links.
export type Run = { kind: 'text'; text: string } | { kind: 'link'; href: string };

const URL_RE = /https?:\/\/[^\s<>"'`]+/g;
// Sentence punctuation right after an address belongs to the sentence, not the address.
const TRAILING = /[.,;:!?)\]}]+$/;

export function linkify(text: string): Run[] {
  const runs: Run[] = [];
  let last = 0;
  for (const m of text.matchAll(URL_RE)) {
    const start = m.index ?? 0;
    let href = m[0];
    const trail = href.match(TRAILING)?.[0] ?? '';
    if (trail) href = href.slice(0, href.length - trail.length);
    if (start > last) runs.push({ kind: 'text', text: text.slice(last, start) });
    runs.push({ kind: 'link', href });
    last = start + href.length;
  }
  if (last < text.length) runs.push({ kind: 'text', text: text.slice(last) });
  return runs;
}

/** Readable text of an HTML-only message: links kept as "label (address)", tags dropped. */
export function textOfHtml(html: string): string {
  return html
    .replace(/<a\s[^>]*href=["']([^"']+)["'][^>]*>(.*?)<\/a>/gis, (_, href: string, label: string) => `${label.replace(/<[^>]+>/g, '')} (${href})`)
    .replace(/<br\s*\/?>/gi, '\n')
    .replace(/<\/(p|div|h\d|li|tr)>/gi, '\n')
    .replace(/<[^>]+>/g, '')
    .replace(/&nbsp;/g, ' ')
    .replace(/&amp;/g, '&')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&#39;/g, "'")
    .replace(/\n{3,}/g, '\n\n')
    .trim();
}
