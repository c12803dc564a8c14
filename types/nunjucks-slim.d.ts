// nunjucks ships no types; the slim browser runtime is used only to render precompiled templates (src/browser/panel/reportRender.ts).
declare module "nunjucks/browser/nunjucks-slim.js" {
  interface Environment {
    render(name: string, context: object): string;
  }
  const nunjucks: {
    Environment: new (loader: unknown, options: { autoescape: boolean; throwOnUndefined: boolean }) => Environment;
    PrecompiledLoader: new (templates: Record<string, unknown>) => unknown;
  };
  export default nunjucks;
}
declare module "report-templates" {
  const templates: Record<string, unknown>;
  export default templates;
}
