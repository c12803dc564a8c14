import { DataError } from "../../../errors.ts";
import type { SourceRequest } from "../types.ts";
import { isSummaryPath, partOfSummary } from "./summarySource.ts";

/**
 * The guard against counting a part twice in a dataset that holds
 * summaries: a raw part and its own summary must agree on the part's digest
 * (then the summary's cells stand for it), and no part may appear twice,
 * raw and summarised under another name or summarised twice.
 */
export class SummaryPairs {
  private readonly summaryOf = new Set<string>();
  private readonly rawDigest = new Map<string, string>();
  private readonly seen = new Map<string, string>();

  constructor(requests: SourceRequest[]) {
    for (const r of requests) if (isSummaryPath(r.label)) this.summaryOf.add(partOfSummary(r.label));
  }

  hasSummary(request: SourceRequest): boolean {
    return this.summaryOf.has(request.label);
  }

  rawRead(request: SourceRequest, sha256: string): void {
    this.rawDigest.set(request.label, sha256);
    // Raw parts alone are not compared with one another: only a dataset that holds summaries is guarded.
    if (this.summaryOf.size > 0 && !this.hasSummary(request)) this.once(request.label, sha256);
  }

  summaryRead(request: SourceRequest, recorded: string): void {
    const part = partOfSummary(request.label);
    const present = this.rawDigest.get(part);
    if (present !== undefined && present !== recorded) {
      throw new DataError(
        `${request.label}: was written from a file with SHA-256 ${recorded}, but the part ${part} beside it has SHA-256 ${present}; the part changed after it was summarised: summarise it again, or remove the stale summary`,
      );
    }
    this.once(request.label, recorded);
  }

  /** Refuse a part's data met a second time (by the digest of the raw part). */
  private once(label: string, sha256: string): void {
    const earlier = this.seen.get(sha256);
    if (earlier !== undefined) {
      throw new DataError(`${label}: holds the same part as ${earlier} (SHA-256 ${sha256}); its realisations would count twice: keep one of them`);
    }
    this.seen.set(sha256, label);
  }
}
