/**
 * Drift for `kind: weights` audits: five monthly checkpoints (safetensors written by numpy at
 * test time) of a network whose first layer is pruned month by month. The README promises drift
 * for every audit spanning three months or more. Reference: numpy on the same arrays — each
 * layer's density per month, the Mann–Kendall S = Σ_{i<j} sign(x_j − x_i) (Gilbert 1987) of the
 * per-layer series, and σ = the sample SD (ddof = 1) of the three baseline months' estimates
 * (weights have no sampling interval, so no standard error enters σ).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildWorkspace } from '../../src/audit/build.ts';
import { readRecord } from '../../src/audit/versions.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { hasScipy, runPython } from '../helpers/python.ts';

const MONTHS = ['2026-01', '2026-02', '2026-03', '2026-04', '2026-05'];

const WRITE = `
import struct
rng = np.random.default_rng(12)
out = {"fc1": [], "fc2": [], "all": []}
for k, path in enumerate(inp["paths"]):
    a = rng.normal(size=(16, 16)).astype('<f4')
    a[rng.random((16, 16)) < 0.1 + 0.12 * k + 0.05 * rng.random()] = 0   # pruned more each month
    b = (rng.normal(size=(8, 16)) * (rng.random((8, 16)) < 0.6)).astype('<f4')
    blobs, header, off = [], {}, 0
    for name, t in (("fc1.weight", a), ("fc2.weight", b)):
        raw = t.tobytes(); header[name] = {"dtype": "F32", "shape": list(t.shape), "data_offsets": [off, off + len(raw)]}; off += len(raw); blobs.append(raw)
    h = json.dumps(header).encode()
    open(path, "wb").write(struct.pack("<Q", len(h)) + h + b"".join(blobs))
    out["fc1"].append(float((a != 0).mean())); out["fc2"].append(float((b != 0).mean()))
    out["all"].append(float(((a != 0).sum() + (b != 0).sum()) / (a.size + b.size)))
def mk(x):
    return int(sum(np.sign(x[j] - x[i]) for i in range(len(x)) for j in range(i + 1, len(x))))
out["mk"] = {k: mk(out[k]) for k in ("fc1", "fc2", "all")}
out["sd"] = {k: float(np.std(out[k][:3], ddof=1)) for k in ("fc1", "fc2", "all")}
print(json.dumps(out))
`;

type Ref = Record<'fc1' | 'fc2' | 'all', number[]> & { mk: Record<string, number>; sd: Record<string, number> };

describe.skipIf(!hasScipy)('drift for weights audits (numpy)', () => {
  let ws = '';
  let ref: Ref;
  beforeAll(async () => {
    ws = mkdtempSync(join(tmpdir(), 'lacuna-wdrift-'));
    mkdirSync(join(ws, 'audits'));
    mkdirSync(join(ws, 'data'));
    ref = runPython<Ref>(WRITE, { paths: MONTHS.map((_, i) => join(ws, 'data', `c${i}.safetensors`)) });
    writeFileSync(join(ws, 'audits', 'w.md'), `---
audit: wdrift
title: checkpoints
kind: weights
datasets:
${MONTHS.map((m, i) => `  - { id: c${i}, path: ../data/c${i}.safetensors, month: ${m} }`).join('\n')}
---
`);
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress: createProgress({ quiet: true }), workers: '1' });
  });
  afterAll(() => {
    if (ws) rmSync(ws, { recursive: true, force: true });
  });

  it('has drift series over whole datasets and per layer, matching numpy', () => {
    const drift = readRecord(ws, 'wdrift', 'v001').result.drift;
    expect(drift).not.toBeNull();
    const find = (measure: string, layer?: string) => drift!.series.find((s) => s.measure === measure && s.layer === layer)!;
    for (const [key, s] of [['all', find('density')], ['fc1', find('density', 'fc1.weight')], ['fc2', find('density', 'fc2.weight')]] as const) {
      expect(s, key).toBeDefined();
      expect(s.points.map((p) => p.month)).toEqual(MONTHS);
      s.points.forEach((p, i) => expect(p.estimate, `${key} ${p.month}`).toBeCloseTo(ref[key][i], 14));
      expect(s.mannKendall!.S, key).toBe(ref.mk[key]);
      expect(s.baseline!.sd, key).toBeCloseTo(ref.sd[key], 14);
      expect(s.points.every((p) => p.interval === null)).toBe(true);
    }
    // Every weight measure has a series; graph density only for the square layer.
    for (const m of ['hoyer', 'gini', 'kurtosis', 'graph_density']) expect(find(m), m).toBeDefined();
    expect(find('graph_density', 'fc1.weight')).toBeDefined();
    expect(find('graph_density', 'fc2.weight')).toBeUndefined();
    expect(drift!.summary).toMatch(/SD of the baseline months’ estimates alone/);
  });
});
