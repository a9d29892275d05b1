// A tiny HTML builder: every interpolated value is escaped unless it is already markup (Markup).

export class Markup {
  constructor(readonly value: string) {}
  toString(): string {
    return this.value;
  }
}

/** Trusted markup (our own SVG charts, already-built fragments). */
export const trusted = (s: string): Markup => new Markup(s);

const ESCAPES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

export function escapeHtml(value: unknown): string {
  return String(value).replace(/[&<>"']/g, (c) => ESCAPES[c]);
}

function part(v: unknown): string {
  if (v === null || v === undefined || v === false) return '';
  if (v instanceof Markup) return v.value;
  if (Array.isArray(v)) return v.map(part).join('');
  return escapeHtml(v);
}

/** Tagged template: `html\`<p>${text}</p>\`` escapes `text`; arrays are joined; null/false are dropped. */
export function html(strings: TemplateStringsArray, ...values: unknown[]): Markup {
  let out = strings[0];
  for (let i = 0; i < values.length; i++) out += part(values[i]) + strings[i + 1];
  return new Markup(out);
}

/** An SVG from our chart renderer, refused if it carries anything but drawing (script, handlers, foreign content). */
export function safeSvg(svg: string | null | undefined): Markup | null {
  if (!svg || !/^\s*<svg[\s>]/.test(svg)) return null;
  if (/<script|<foreignObject|\son[a-z]+\s*=|javascript:/i.test(svg)) return null;
  return new Markup(svg.replace(/^\s*<svg/, '<svg role="img" focusable="false"'));
}
