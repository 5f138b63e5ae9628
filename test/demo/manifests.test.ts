/**
 * The manifests committed under content/audits are the scenario's own (src/demo/scenario.ts):
 * `lacuna demo` keeps manifests already there, so a stale committed copy would name data the
 * scenario no longer writes and the demo would not build.
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { DEMO_MANIFESTS } from '../../src/demo/scenario.ts';

describe('the packaged demo', () => {
  it('commits exactly the scenario manifests', () => {
    const dir = new URL('../../content/audits/', import.meta.url);
    expect(readdirSync(dir).sort()).toEqual(Object.keys(DEMO_MANIFESTS).sort());
    for (const [name, text] of Object.entries(DEMO_MANIFESTS)) expect(readFileSync(new URL(name, dir), 'utf8'), name).toBe(text);
  });
});
