// Eleventy configuration for the report site. The data (audits, archive) is
// added as global data by src/report/buildSite.ts, which runs Eleventy through
// its programmatic API; templates live in templates/.
export default function (eleventyConfig) {
  // Eleventy skips every path under a node_modules folder, and an installed copy of this tool lives in one:
  // its templates are our own, so they must not be skipped.
  eleventyConfig.ignores.delete("**/node_modules/**");
  eleventyConfig.setNunjucksEnvironmentOptions({ throwOnUndefined: false, autoescape: true });
  return {
    dir: { input: "templates", includes: "_includes", data: "_data", output: "site" },
    templateFormats: ["njk"],
    htmlTemplateEngine: "njk",
  };
}
