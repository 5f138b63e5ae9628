/**
 * The manifest stage: manifest files in, `ResolvedManifest`s out.
 *
 *   text → parse.ts (front matter, nothing run) → validate.ts (field table in schema.ts)
 *        → paths.ts + format.ts (files inside the workspace) → load.ts (ResolvedManifest)
 *   check.ts runs all of it over a workspace, plus the readers' header check.
 */
export { loadManifest, findManifests, MAX_MANIFEST_BYTES } from './load.ts';
export { parseManifestText } from './parse.ts';
export { validateManifest } from './validate.ts';
export type { ValidatedManifest, ValidatedDataset } from './validate.ts';
export { resolveInsideWorkspace } from './paths.ts';
export { manifestReferenceMarkdown, MANIFEST_FIELDS } from './schema.ts';
export { checkWorkspace } from './check.ts';

