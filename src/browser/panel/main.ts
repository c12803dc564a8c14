/// <reference lib="dom" />
/// <reference lib="dom.iterable" />
import { wireDropInPanel } from "./dropInPanel.ts";
import { wireRerunPanel } from "./rerunPanel.ts";

/**
 * Entry of rerun-panel.js: wires every panel on the page. The panels' markup
 * is in templates/_includes (rerun-panel.njk, dropin-panel.njk); without this
 * script they show a note that they need JavaScript.
 */
for (const root of document.querySelectorAll<HTMLElement>("[data-rerun-panel]")) wireRerunPanel(root);
for (const root of document.querySelectorAll<HTMLElement>("[data-dropin-panel]")) wireDropInPanel(root);
