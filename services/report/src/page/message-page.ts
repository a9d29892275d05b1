import { html } from './html';
import { pageShell } from './shell';

/** A short page for 401/403/404: what happened and what to do. */
export function renderMessagePage(title: string, message: string, hint?: string): string {
  return pageShell(
    title,
    html`<header class="top"><div><div class="where"><a href="/">stemwise</a></div><h1>${title}</h1></div></header>
<main><p>${message}</p>${hint ? html`<p class="muted">${hint}</p>` : null}</main>`,
  );
}
