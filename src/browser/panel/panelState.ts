/// <reference lib="dom" />
import { part } from "./dom.ts";
import { byteSizeText } from "../../report/format/byteSize.ts";
import type { EngineProgress } from "./engineClient.ts";

/**
 * The moving parts every panel has: the run and cancel buttons, a progress
 * bar, a status line read out by screen readers (aria-live) and the outcome.
 * A run takes an AbortController that cancel aborts.
 */
export class PanelState {
  readonly run: HTMLButtonElement;
  readonly cancel: HTMLButtonElement;
  readonly progress: HTMLProgressElement;
  readonly status: HTMLElement;
  readonly outcome: HTMLElement;
  private controller: AbortController | null = null;

  constructor(readonly root: HTMLElement) {
    this.run = part<HTMLButtonElement>(root, '[data-action="run"]');
    this.cancel = part<HTMLButtonElement>(root, '[data-action="cancel"]');
    this.progress = part<HTMLProgressElement>(root, "[data-progress]");
    this.status = part(root, "[data-status]");
    this.outcome = part(root, "[data-outcome]");
    this.cancel.addEventListener("click", () => this.controller?.abort());
  }

  /** Start a run: buttons and progress set, the previous outcome cleared; the signal is aborted by cancel. */
  begin(): AbortSignal {
    this.controller = new AbortController();
    this.run.disabled = true;
    this.cancel.disabled = false;
    this.progress.hidden = false;
    this.progress.removeAttribute("value");
    this.outcome.replaceChildren();
    this.root.setAttribute("aria-busy", "true");
    return this.controller.signal;
  }

  /** End a run, whatever its outcome; focus moves to the cancel button's neighbour so a keyboard user stays in the panel. */
  end(): void {
    const hadFocus = document.activeElement === this.cancel;
    this.controller = null;
    this.cancel.disabled = true;
    this.progress.hidden = true;
    this.root.removeAttribute("aria-busy");
    if (hadFocus) this.outcome.focus();
  }

  say(text: string): void {
    this.status.textContent = text;
  }

  /** A fraction done, or an unknown amount when total is 0. */
  fraction(done: number, total: number): void {
    if (total > 0) {
      this.progress.max = total;
      this.progress.value = Math.min(done, total);
    } else this.progress.removeAttribute("value");
  }

  /** "Fetched 1.2 MB of 3.4 MB (data/exchange.csv)". */
  fetched(received: number, total: number, file: string): void {
    this.fraction(received, total);
    this.say(`Fetched ${byteSizeText(received)} of ${byteSizeText(total)} (${file}).`);
  }

  /** The engine's own progress: bytes read, then checks done. */
  engine(p: EngineProgress): void {
    this.fraction(p.done, p.total);
    if (p.phase === "ingest") this.say(`Reading the data: ${byteSizeText(p.done)} of ${byteSizeText(p.total)}${p.label ? ` (${p.label})` : ""}.`);
    else if (p.phase === "checks") this.say(`Running the checks: ${p.done} of ${p.total} done${p.label ? ` (${p.label})` : ""}.`);
    else this.say("Checks done; comparing.");
  }
}
