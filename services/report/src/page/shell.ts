import { escapeHtml, type Markup } from './html';
import { PAGE_CSS } from './style';

/** The document around a page: no scripts, styles inline, prints on A4 or letter. */
export function pageShell(title: string, body: Markup): string {
  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<meta name="robots" content="noindex">
<link rel="icon" href="data:,">
<title>${escapeHtml(title)}</title>
<style>${PAGE_CSS}</style>
</head>
<body>${body.value}
</body>
</html>
`;
}

/** Headers for every page: no scripts may run, nothing loads from elsewhere, forms go to the same server only (the map's variable), not framed, not cached by others. */
export const PAGE_HEADERS: Readonly<Record<string, string>> = {
  'content-security-policy': "default-src 'none'; style-src 'unsafe-inline'; img-src 'self' data:; base-uri 'none'; form-action 'self'; frame-ancestors 'none'",
  'x-content-type-options': 'nosniff',
  'referrer-policy': 'no-referrer',
  'cache-control': 'private, no-cache',
};
