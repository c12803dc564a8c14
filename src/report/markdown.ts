import MarkdownIt from "markdown-it";

// html: false — raw HTML in a user's description is shown as text, never injected.
const md = new MarkdownIt({ html: false, linkify: true, typographer: false });

/** Render a user's Markdown description safely. */
export function renderMarkdown(text: string | undefined): string {
  return text ? md.render(text) : "";
}
