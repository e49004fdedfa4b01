/**
 * The docs as human pages: docs/*.md rendered to HTML by markdown-it (CommonMark) with raw HTML off, so a page
 * cannot carry markup or script of its own; links between docs lose their ".md" so they stay on the HTML pages.
 */
import MarkdownIt from 'markdown-it';
import { html, raw } from './escape.js';
import { STYLESHEET_PATH } from './page.js';

const md = new MarkdownIt({ html: false, linkify: false, typographer: false });
const defaultLinkOpen = md.renderer.rules.link_open ?? ((tokens, i, opts, _env, self) => self.renderToken(tokens, i, opts));
md.renderer.rules.link_open = (tokens, i, opts, env, self) => {
  const got = tokens[i]?.attrGet('href');
  const href = got === null || got === undefined ? undefined : String(got);
  if (href && !/^[a-z][a-z0-9+.-]*:/i.test(href) && !href.startsWith('#')) tokens[i]?.attrSet('href', href.replace(/\.md(?=$|#)/, ''));
  return defaultLinkOpen(tokens, i, opts, env, self);
};

/** A full HTML page for one Markdown document; its title is the first heading. */
export function docsPage(markdown: string, fallbackTitle: string): string {
  const title = /^#\s+(.+)$/m.exec(markdown)?.[1]?.trim() ?? fallbackTitle;
  return `<!doctype html>\n${html`<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${title} · Tidemark</title><link rel="stylesheet" href="${STYLESHEET_PATH}"></head><body><main class="docs">${raw(md.render(markdown))}</main></body></html>`.html}\n`;
}
