/**
 * What every report page shares: text made safe for HTML, and the document around a page's body (a
 * language, a character set, a viewport for small screens, its styles inline: nothing is fetched).
 */

export function escapeHtml(text: string): string {
  return text.replaceAll('&', '&amp;').replaceAll('<', '&lt;').replaceAll('>', '&gt;').replaceAll('"', '&quot;').replaceAll("'", '&#39;');
}

/** A whole HTML document: the title (plain text), the page's CSS, and the body's parts (HTML) in order. */
export function htmlPage(title: string, style: string, body: readonly string[]): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    `<title>${escapeHtml(title)}</title>`,
    `<style>${style}</style>`,
    '</head>',
    '<body>',
    ...body,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}
