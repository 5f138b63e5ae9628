/**
 * Page models for an audit's version list (`<out>/<audit>/index.html`), its stable `latest/`
 * forwarder, and the site index (`<out>/index.html`). Links are relative and point at explicit
 * `index.html` files so the pages work from `file://` as well as from a static host.
 */
import type { VersionEntry } from '../types.ts';
import { formatCount, formatDate } from './site-format.ts';

/** A path segment for a link: percent-encoded, so a version or audit name cannot add markup or `..`. */
export function hrefSegment(name: string): string {
  const enc = encodeURIComponent(name);
  return enc === '.' || enc === '..' ? enc.replace(/\./g, '%2E') : enc;
}

export interface AuditIndexInput {
  audit: string;
  title: string;
  versions: VersionEntry[];
  latest: string;
}

export interface AuditIndexModel {
  audit: string;
  title: string;
  latest: string;
  versions: { version: string; created: string; changes: string; inputsHash: string; inputsHashShort: string; href: string; latest: boolean }[];
}

/** Versions newest first (by `created`, then by version name). */
export function auditIndexModel(input: AuditIndexInput): AuditIndexModel {
  const sorted = [...input.versions].sort((a, b) => (a.created === b.created ? (a.version < b.version ? 1 : -1) : a.created < b.created ? 1 : -1));
  return {
    audit: input.audit,
    title: input.title,
    latest: input.latest,
    versions: sorted.map((v) => ({
      version: v.version,
      created: formatDate(v.created),
      changes: v.changes,
      inputsHash: v.inputsHash,
      inputsHashShort: v.inputsHash.slice(0, 12),
      href: `${hrefSegment(v.version)}/index.html`,
      latest: v.version === input.latest,
    })),
  };
}

export interface LatestModel {
  title: string;
  version: string;
  /** Relative from `<audit>/latest/index.html` to the newest version's report. */
  target: string;
}

export function latestModel(input: AuditIndexInput): LatestModel {
  return { title: input.title, version: input.latest, target: `../${hrefSegment(input.latest)}/index.html` };
}

export interface SiteAuditInput {
  audit: string;
  title: string;
  latest: string;
  created: string;
  datasets: number;
  findings: { exclude: number; caution: number; notice: number };
  /** The audit has records but its manifest was removed: its versions stay readable. */
  manifestRemoved?: boolean;
}

export interface SiteIndexModel {
  audits: { audit: string; title: string; latest: string; created: string; href: string; latestHref: string; datasets: string; exclude: string; caution: string; notice: string; manifestRemoved: boolean }[];
}

/** Audits sorted by title, then id. */
export function siteIndexModel(audits: SiteAuditInput[]): SiteIndexModel {
  const sorted = [...audits].sort((a, b) => a.title.localeCompare(b.title, 'en') || a.audit.localeCompare(b.audit, 'en'));
  return {
    audits: sorted.map((a) => ({
      audit: a.audit,
      title: a.title,
      latest: a.latest,
      created: formatDate(a.created),
      href: `${hrefSegment(a.audit)}/index.html`,
      latestHref: `${hrefSegment(a.audit)}/${hrefSegment(a.latest)}/index.html`,
      datasets: formatCount(a.datasets),
      exclude: formatCount(a.findings.exclude),
      caution: formatCount(a.findings.caution),
      notice: formatCount(a.findings.notice),
      manifestRemoved: a.manifestRemoved ?? false,
    })),
  };
}
