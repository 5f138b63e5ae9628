/**
 * Where a field sits in the YAML text, for error messages.
 *
 * An approximation by text search, not a YAML parse: for `datasets[2].month` it finds the
 * top-level `datasets:` line, then the third `- ` item under it, then the `month:` key at that
 * item's key column. Flow style (`bootstrap: { seed: 1 }`) is searched on the parent's line.
 * Keys written across several lines (`? key`), multi-line flow collections and keys whose names
 * also appear inside block scalars can fool it; when a step is not found, the line of the
 * nearest ancestor found is returned (or undefined when not even the first key was found).
 */

interface Line {
  /** Column of the first non-space character. */
  start: number;
  /** Column of the content after leading `- ` sequence markers, and that content. */
  keyCol: number;
  keyText: string;
  /** True when the line starts a sequence item. */
  item: boolean;
  skip: boolean;
}

interface Scope {
  start: number;
  end: number;
  col: number | null;
  /** Text after the parent's `key:` (or `- `), and its line, for flow-style lookups. */
  inline: string;
  inlineLine: number;
}

function describeLine(raw: string): Line {
  const start = raw.length - raw.trimStart().length;
  let col = start;
  let text = raw.slice(start);
  const item = text === '-' || text.startsWith('- ');
  while (text === '-' || text.startsWith('- ')) {
    const rest = text.slice(1);
    const pad = rest.length - rest.trimStart().length;
    col += 1 + pad;
    text = rest.slice(pad);
  }
  const content = raw.trim();
  return { start, keyCol: col, keyText: text, item, skip: content === '' || content.startsWith('#') };
}

function escapeRe(s: string): string {
  return s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
}

/** Split `datasets[2].month` into `['datasets', 2, 'month']`. */
export function splitFieldPath(path: string): (string | number)[] {
  const out: (string | number)[] = [];
  for (const m of path.matchAll(/([^.[\]]+)|\[(\d+)\]/g)) {
    out.push(m[2] !== undefined ? Number(m[2]) : m[1]);
  }
  return out;
}

/**
 * A `lineOf(fieldPath)` for a YAML block whose line 0 is file line `firstLine`.
 * Cost: O(lines × path depth) per call.
 */
export function makeLineOf(block: string, firstLine: number): (fieldPath: string) => number | undefined {
  const lines = block.split(/\r?\n/).map(describeLine);
  return (fieldPath) => {
    let scope: Scope = { start: 0, end: lines.length, col: null, inline: '', inlineLine: -1 };
    let found: number | undefined;
    for (const seg of splitFieldPath(fieldPath)) {
      const next = typeof seg === 'number' ? findItem(lines, scope, seg) : findKey(lines, scope, seg);
      if (!next) break;
      found = next.line;
      scope = next.scope;
    }
    return found === undefined ? undefined : found + firstLine;
  };
}

function firstContent(lines: Line[], scope: Scope): number {
  for (let i = scope.start; i < scope.end; i++) if (!lines[i].skip) return i;
  return -1;
}

function findKey(lines: Line[], scope: Scope, key: string): { line: number; scope: Scope } | null {
  const keyRe = new RegExp(`^(["']?)${escapeRe(key)}\\1\\s*:(\\s|$)`);
  const first = firstContent(lines, scope);
  const col = scope.col ?? (first === -1 ? -1 : lines[first].keyCol);
  for (let i = scope.start; i < scope.end; i++) {
    const l = lines[i];
    if (l.skip || l.keyCol !== col || !keyRe.test(l.keyText)) continue;
    let end = i + 1;
    while (end < scope.end && (lines[end].skip || lines[end].start > col || (lines[end].start === col && lines[end].item && !l.item))) end++;
    const inline = l.keyText.slice(l.keyText.indexOf(':') + 1);
    return { line: i, scope: { start: i + 1, end, col: null, inline, inlineLine: i } };
  }
  // Flow style on the parent's line: `{ key: value, … }`.
  if (new RegExp(`[{,]\\s*(["']?)${escapeRe(key)}\\1\\s*:`).test(scope.inline)) {
    const line = scope.inlineLine;
    return line >= 0 ? { line, scope: { start: scope.start, end: scope.start, col: null, inline: scope.inline, inlineLine: line } } : null;
  }
  return null;
}

function findItem(lines: Line[], scope: Scope, index: number): { line: number; scope: Scope } | null {
  const first = firstContent(lines, scope);
  if (first === -1 || !lines[first].item) return null;
  const itemCol = lines[first].start;
  const items: number[] = [];
  for (let i = scope.start; i < scope.end; i++) if (!lines[i].skip && lines[i].item && lines[i].start === itemCol) items.push(i);
  if (index >= items.length) return null;
  const line = items[index];
  const end = index + 1 < items.length ? items[index + 1] : scope.end;
  const l = lines[line];
  // `- id: a` puts the item's first key on the item line; a bare `-` puts it on the next line.
  return { line, scope: { start: l.keyText === '' ? line + 1 : line, end, col: l.keyText === '' ? null : l.keyCol, inline: l.keyText, inlineLine: line } };
}

/**
 * The flow collection (`{` or `[`) that is open at `position` of a YAML block and never closed
 * after it, for a syntax error whose true cause is a missing `}` or `]`: the parser only notices
 * on a later line, so its line alone points past the mistake. Returns the 0-based line and
 * column of the opening bracket, or null when every collection open there is closed later.
 *
 * A text scan, not a YAML parse: brackets count inside flow collections and, outside them, only
 * where a value starts (after `key:`, `- ` or at the start of a line); quoted scalars and
 * comments are skipped. Brackets inside block scalars (`|`, `>`) can fool it.
 */
export function unclosedFlowAt(block: string, position: number): { line: number; column: number; bracket: string } | null {
  const stack: { line: number; column: number; bracket: string; pos: number }[] = [];
  let line = 0;
  let lineStart = 0;
  let openAtError: typeof stack | null = null;
  let valueStart = true; // a value or key may start here (outside flow collections)
  for (let i = 0; i < block.length; i++) {
    if (openAtError === null && i >= position) openAtError = [...stack];
    const c = block[i];
    if (c === '\n') {
      line++;
      lineStart = i + 1;
      valueStart = true;
      continue;
    }
    const prev = i > lineStart ? block[i - 1] : '\n';
    if (c === '#' && /\s/.test(prev)) {
      while (i + 1 < block.length && block[i + 1] !== '\n') i++;
      continue;
    }
    const startsToken = stack.length > 0 ? /[\s{[,:]/.test(prev) : valueStart;
    if ((c === '"' || c === "'") && startsToken) {
      // Skip the quoted scalar (`\"` escapes in double quotes, `''` in single quotes).
      for (i++; i < block.length; i++) {
        if (block[i] === '\n') {
          line++;
          lineStart = i + 1;
        } else if (c === '"' && block[i] === '\\') i++;
        else if (block[i] === c) {
          if (c === "'" && block[i + 1] === "'") i++;
          else break;
        }
      }
      valueStart = false;
      continue;
    }
    if ((c === '{' || c === '[') && (stack.length > 0 || valueStart)) {
      stack.push({ line, column: i - lineStart, bracket: c, pos: i });
      continue;
    }
    if ((c === '}' || c === ']') && stack.length > 0) {
      stack.pop();
      continue;
    }
    if (stack.length === 0) {
      if (c === ':' && /[\s]/.test(block[i + 1] ?? ' ')) valueStart = true;
      else if (c === '-' && valueStart && /[\s]/.test(block[i + 1] ?? ' ')) valueStart = true;
      else if (!/\s/.test(c)) valueStart = false;
    }
  }
  if (openAtError === null) openAtError = [...stack];
  // The innermost collection open at the error that is still open at the end was never closed.
  for (let k = openAtError.length - 1; k >= 0; k--) {
    const o = openAtError[k];
    if (stack.some((s) => s.pos === o.pos)) return { line: o.line, column: o.column, bracket: o.bracket };
  }
  return null;
}
