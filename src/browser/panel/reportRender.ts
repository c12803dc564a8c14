import nunjucks from "nunjucks/browser/nunjucks-slim.js";
import templates from "report-templates";
import { auditPageModel } from "../../report/viewModel.ts";
import type { ResultDocument } from "../../report/resultDocument.ts";

/**
 * The report body of a result document, rendered in the browser by the site's
 * own code: the view model of src/report/viewModel.ts (KaTeX equations, SVG
 * plots, formatted tables) and the templates/_includes/report.njk template,
 * precompiled when the site was built (src/report/panelAssets.ts). Loaded by the
 * drop-in panel only when a reader audits a folder.
 */

// The environment the site's pages are rendered with (.eleventy.js): escaped output, undefined values empty.
const env = new nunjucks.Environment(new nunjucks.PrecompiledLoader(templates), { autoescape: true, throwOnUndefined: false });

/** The HTML of the report for `doc`, as a version page shows it (without the version's history and downloads). */
export function renderReport(doc: ResultDocument): string {
  return env.render("report.njk", { audit: auditPageModel(doc) });
}
