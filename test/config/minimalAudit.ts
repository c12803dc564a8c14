/** The smallest valid audit.yaml the config tests start from, so that each test file need not carry its own copy. */

/** One `samples` dataset entry of the `datasets:` list (a heat and particle exchange, no work). */
export const samplesDatasetYaml = (id = "run-1") => `  - id: ${id}
    kind: samples
    file: data/run.csv
    columns: { Q: q, dN: n }
    energy_unit: meV
    reservoirs:
      A: { T: 1.3, mu: 0 }
      B: { T: 1.0, mu: 0 }
    work: zero
`;

/** A valid definition with one samples dataset; `header` is inserted after the title (e.g. `doi: …\n`), shifting later lines. */
export const minimalAuditYaml = (header = "") => `id: demo-audit
title: A demo
${header}authors:
  - { name: "A. Person" }
datasets:
${samplesDatasetYaml()}`;
