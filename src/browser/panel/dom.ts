/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
/**
 * The few DOM helpers the panels share: elements built from text (never from
 * HTML strings, so nothing a file or a result holds can become markup).
 */

type Child = Node | string | null | undefined | false;

/** `<tag attrs…>children</tag>`; attribute values and text are set as text. */
export function el<K extends keyof HTMLElementTagNameMap>(tag: K, attrs: Record<string, string> = {}, ...children: Child[]): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) node.setAttribute(k, v);
  for (const c of children) if (c !== null && c !== undefined && c !== false) node.append(c);
  return node;
}

/** The first element under `root` matching `selector`, or an error naming it (a template and the script out of step). */
export function part<T extends Element = HTMLElement>(root: ParentNode, selector: string): T {
  const found = root.querySelector<T>(selector);
  if (!found) throw new Error(`panel: no element ${selector}`);
  return found;
}

/** A table with a caption, header row and body rows of text cells. */
export function textTable(caption: string, headers: readonly string[], rows: readonly (readonly Child[])[], className = ""): HTMLElement {
  return el(
    "div",
    { class: "table-wrap" },
    el(
      "table",
      className ? { class: className } : {},
      el("caption", {}, caption),
      el("thead", {}, el("tr", {}, ...headers.map((h) => el("th", { scope: "col" }, h)))),
      el("tbody", {}, ...rows.map((r) => el("tr", {}, ...r.map((c) => el("td", {}, c))))),
    ),
  );
}

/** Replace the script-less note by the controls: the panel works. */
export function enablePanel(root: HTMLElement): void {
  for (const n of root.querySelectorAll<HTMLElement>("[data-rerun-noscript]")) n.hidden = true;
  for (const n of root.querySelectorAll<HTMLElement>("[data-rerun-controls]")) n.hidden = false;
}
