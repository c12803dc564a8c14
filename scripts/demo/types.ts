/** One generated demo audit: its audit.yaml and its data files (paths relative to the audit folder). */
export interface DemoAudit {
  id: string;
  yaml: string;
  files: Record<string, string>;
}
