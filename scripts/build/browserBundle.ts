// The browser re-run bundle (rerun-worker.js): see src/browser/engine/browserBundle.ts, where it
// lives so that the installed package (which ships dist/, not scripts/) can copy its prebuilt copy.
// Code under src/ imports it from there; scripts and prepack from here.
export { buildBrowserBundle, BUNDLE_FILE } from "../../src/browser/engine/browserBundle.ts";
