import fs from "node:fs";
import { chromium, type Browser } from "playwright-core";
import { InputError } from "../../errors.ts";

/** Debian's Chromium; another build can be named with TRANSPORT_AUDIT_CHROMIUM. */
export const DEFAULT_CHROMIUM = "/usr/bin/chromium";

/**
 * Flags for a quiet headless run: no sandbox (we run as root in CI), no GPU,
 * and none of the browser's own network traffic (updates, sync, safe
 * browsing), which a closed network refuses anyway.
 */
export const CHROMIUM_ARGS = [
  "--no-sandbox",
  "--disable-gpu",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--no-first-run",
];

export function chromiumPath(explicit?: string): string {
  const file = explicit ?? process.env.TRANSPORT_AUDIT_CHROMIUM ?? DEFAULT_CHROMIUM;
  if (!fs.existsSync(file)) {
    throw new InputError(
      `${file}: no Chromium there; printing needs a headless Chromium (on Debian: apt-get install chromium), or name another with --chromium <file> or TRANSPORT_AUDIT_CHROMIUM`,
    );
  }
  return file;
}

export interface LaunchedBrowser {
  browser: Browser;
  close: () => Promise<void>;
}

/**
 * Start headless Chromium. playwright-core gives every launch a fresh,
 * throw-away profile folder of its own and removes it on close.
 */
export async function launchChromium(executable?: string): Promise<LaunchedBrowser> {
  const browser = await chromium.launch({ executablePath: chromiumPath(executable), headless: true, args: CHROMIUM_ARGS });
  return { browser, close: () => browser.close() };
}
