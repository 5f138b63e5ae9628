/** Temporary workspaces for the manifest tests (test-only helper). */
import { mkdirSync, mkdtempSync, realpathSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';

export interface TempWorkspace {
  /** Parent temp folder (holds `ws/` and `outside/`). */
  base: string;
  /** The workspace root. */
  root: string;
  /** A folder beside the workspace, outside it. */
  outside: string;
  write(rel: string, text?: string): string;
  link(rel: string, target: string): string;
  cleanup(): void;
}

export function tempWorkspace(): TempWorkspace {
  const base = realpathSync(mkdtempSync(path.join(tmpdir(), 'lacuna-manifest-')));
  const root = path.join(base, 'ws');
  const outside = path.join(base, 'outside');
  mkdirSync(path.join(root, 'audits'), { recursive: true });
  mkdirSync(outside, { recursive: true });
  writeFileSync(path.join(outside, 'secret.npy'), 'not data');
  const write = (rel: string, text = '') => {
    const full = path.join(root, rel);
    mkdirSync(path.dirname(full), { recursive: true });
    writeFileSync(full, text);
    return full;
  };
  const link = (rel: string, target: string) => {
    const full = path.join(root, rel);
    mkdirSync(path.dirname(full), { recursive: true });
    symlinkSync(target, full);
    return full;
  };
  return { base, root, outside, write, link, cleanup: () => rmSync(base, { recursive: true, force: true }) };
}

/** The README's example manifest, with the two data folders it names made by `tempWorkspace`. */
export const EXAMPLE_MANIFEST = `---
audit: kc-survey            # slug: lowercase letters, digits, '-'
title: Mushroom-body survey, 2026
kind: activity              # activity (units × bins) | weights (matrices)
axis: time                  # time (bins autocorrelated: block bootstrap) | stimuli (independent)
bin_ms: 10
zero_tolerance: 0
bootstrap: { resamples: 2000, level: 0.95, method: bca, seed: 1 }
datasets:
  - id: m01-rig-a
    path: ../data/kc/2026-01/  # a file or a folder (optional \`files: "*.npy"\`), relative to the manifest
    month: 2026-01
    group: rig-a
    layout: units-by-bins   # or bins-by-units
  - id: m02-rig-b
    path: ../data/kc/2026-02/session-1.npy
    month: 2026-02
    group: rig-b
---
Free markdown notes by the lab.
`;
