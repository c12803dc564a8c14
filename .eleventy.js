// Eleventy configuration for the report site. The data (audits, archive) is
// added as global data by src/report/buildSite.ts, which runs Eleventy through
// its programmatic API; templates live in templates/.
export default function (eleventyConfig) {
  eleventyConfig.setNunjucksEnvironmentOptions({ throwOnUndefined: false, autoescape: true });
  return {
    dir: { input: "templates", includes: "_includes", data: "_data", output: "site" },
    templateFormats: ["njk"],
    htmlTemplateEngine: "njk",
  };
}
