/**
 * Pages that could not be rendered, after their records were written.
 *
 * A record is the truth and is never taken back: when rendering a version fails (a bug in the
 * chart or page code, a full disk), the build renders what it can (the other versions, the
 * version lists, the site index), then stops with this error. The version's folder is left out
 * of the site (rendering goes to a temporary folder that is renamed into place only when
 * complete), so the next `lacuna build` sees the pages missing and renders them again.
 */

export interface RenderFailureItem {
  audit: string;
  version: string;
  /** What was being made when it failed. */
  step: 'charts' | 'pages';
  /** The record the pages come from (workspace-relative). */
  record: string;
  cause: unknown;
}

function describe(cause: unknown): string {
  return cause instanceof Error ? `${cause.name}: ${cause.message}` : String(cause);
}

export class RenderFailure extends Error {
  readonly failures: RenderFailureItem[];
  constructor(failures: RenderFailureItem[]) {
    const lines = failures.map((f) => `  ${f.audit} ${f.version}: making the ${f.step} failed (${describe(f.cause)}); record ${f.record} is kept`);
    super(
      `rendering failed for ${failures.length} version${failures.length === 1 ? '' : 's'}:\n${lines.join('\n')}\n` +
        'The records are complete and the rest of the site was written; the next `lacuna build` renders the missing pages again.',
      { cause: failures[0]?.cause },
    );
    this.name = 'RenderFailure';
    this.failures = failures;
  }
}
