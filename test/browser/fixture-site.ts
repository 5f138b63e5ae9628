/**
 * Build a small report site from the hand-made fixtures (`test/fixtures/audit-result.ts`) into
 * a folder, the way `lacuna build` lays it out: charts from `src/charts`, every page from
 * `src/report/site.ts`, the shared assets once.
 */
import { buildCharts, renderChartSvgs } from '../../src/charts/index.ts';
import { copyAssets, renderAuditIndex, renderSiteIndex, renderVersion } from '../../src/report/site.ts';
import type { AuditResult, VersionComparison, VersionEntry } from '../../src/types.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

export interface FixtureSite {
  outDir: string;
  audits: { result: AuditResult; versionDir: string }[];
}

/** A comparison with the activity fixture's (made-up) previous version, so compare.html is written. */
export function fixtureComparison(result: AuditResult): VersionComparison {
  return {
    audit: result.audit,
    from: '2024-05-31T08-00-00Z',
    to: result.version,
    inputs: [{ path: 'data/2024-02/session_2.csv', change: 'changed' }],
    parameters: [{ name: 'bootstrap.resamples', from: 1000, to: 2000 }],
    datasets: [
      {
        id: 'rig-a-2024-01',
        change: 'same',
        measures: [{ measure: 'population_sparseness', from: 0.4948, to: 0.4948, delta: 0, relative: 0, overlap: true }],
      },
      {
        id: 'rig-a-2024-02',
        change: 'changed',
        measures: [{ measure: 'lifetime_sparseness', from: 0.7012, to: 0.72717, delta: 0.02597, relative: 0.037036, overlap: true }],
      },
    ],
    summary: 'One input file changed (session 2 of February); lifetime sparseness of rig-a-2024-02 rose by 0.026.',
  };
}

/** Render both fixtures (the activity one with a previous version) into `outDir`. */
export async function buildFixtureSite(outDir: string, results: AuditResult[] = [activityFixture(), weightsFixture()]): Promise<FixtureSite> {
  const audits: FixtureSite['audits'] = [];
  for (const result of results) {
    const charts = await renderChartSvgs(buildCharts(result));
    const versions: VersionEntry[] = [{ version: result.version, created: result.created, inputsHash: '0'.repeat(64), changes: 'first build' }];
    const comparison = result.drift ? fixtureComparison(result) : null;
    if (comparison) {
      // The previous version the comparison starts from: the same result, earlier, in its own folder.
      versions.unshift({ version: comparison.from, created: '2024-05-31T08:00:00.000Z', inputsHash: '1'.repeat(64), changes: 'first build' });
      versions[1].changes = 'one input file changed';
      const previous = { ...structuredClone(result), version: comparison.from, created: versions[0].created };
      await renderVersion({ result: previous, charts, comparison: null, versions: versions.slice(0, 1) }, `${outDir}/${result.audit}/${previous.version}`);
    }
    const versionDir = `${outDir}/${result.audit}/${result.version}`;
    await renderVersion({ result, charts, comparison, versions }, versionDir);
    await renderAuditIndex({ audit: result.audit, title: result.title, versions, latest: result.version }, `${outDir}/${result.audit}`);
    audits.push({ result, versionDir });
  }
  await renderSiteIndex(
    audits.map(({ result }) => ({
      audit: result.audit,
      title: result.title,
      latest: result.version,
      created: result.created,
      datasets: result.datasets.length,
      findings: {
        exclude: result.datasets.reduce((k, d) => k + d.findings.filter((f) => f.level === 'exclude').length, 0),
        caution: result.datasets.reduce((k, d) => k + d.findings.filter((f) => f.level === 'caution').length, 0),
        notice: result.datasets.reduce((k, d) => k + d.findings.filter((f) => f.level === 'notice').length, 0),
      },
    })),
    outDir,
  );
  await copyAssets(outDir);
  return { outDir, audits };
}
