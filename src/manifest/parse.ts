/**
 * Splitting a manifest into its YAML front matter and its markdown notes, with nothing run.
 *
 * 1. The text must open with a bare `---` line (or `--- yaml`/`--- yml`); any other language
 *    tag (`---js`, `---javascript`, `---coffee`, `---json`, …) is refused before gray-matter
 *    sees it. gray-matter 4 would otherwise `eval` a `---js` block.
 * 2. The front matter must be closed by a `---` line and be at most 256 KiB.
 * 3. gray-matter splits the text with every engine replaced: `yaml` is ours (below), the rest throw.
 * 4. YAML is read by the js-yaml 3 that gray-matter itself ships, with its CORE schema: no
 *    `!!js/function`, `!!js/regexp`, `!!binary`, timestamps or merge keys exist there, so any
 *    such tag is an "unknown tag" error. Anchors (`&a`), and so aliases (`*a`), are refused too:
 *    a manifest is small data and needs no references. Nesting deeper than 64 levels is refused
 *    before the parser runs (yaml-depth.ts), since js-yaml recurses once per level.
 */
import { createRequire } from 'node:module';
import matter from 'gray-matter';
import { InputError } from '../errors.ts';
import { makeLineOf, unclosedFlowAt } from './lines.ts';
import { checkYamlDepth } from './yaml-depth.ts';

/** The parts of js-yaml 3 used here (it ships no types). */
interface JsYaml3 {
  load(text: string, options: { schema: unknown; filename?: string; json?: boolean; listener?: (event: 'open' | 'close', state: YamlState) => void }): unknown;
  CORE_SCHEMA: unknown;
  YAMLException: new (...args: never[]) => Error & { reason?: string; mark?: { line: number; column: number; position?: number } };
}
interface YamlState { anchor?: string | null; line: number }

// The js-yaml that gray-matter depends on (3.x), resolved from gray-matter's own folder.
const requireFromMatter = createRequire(createRequire(import.meta.url).resolve('gray-matter'));
const yaml = requireFromMatter('js-yaml') as JsYaml3;

export const MAX_FRONT_MATTER_BYTES = 256 * 1024;

export interface ParsedManifestText {
  /** The front matter as plain data (not yet validated). */
  data: unknown;
  /** The markdown after the closing `---`. */
  body: string;
  /** 1-based line in the file of a field (`datasets[2].month`), or of its nearest ancestor found. */
  lineOf(fieldPath: string): number | undefined;
}

class AnchorRefused extends Error {
  constructor(readonly anchor: string, readonly yamlLine: number) {
    super('anchor');
  }
}

/**
 * Parse a manifest's text. Throws an `InputError` naming `file` (and the line) for: no front
 * matter, a language tag other than yaml, an unclosed or oversized front matter, YAML syntax
 * errors, unknown or code tags, anchors/aliases, and front matter that is not a mapping.
 * Cost: linear in the text length.
 */
export function parseManifestText(text: string, file: string): ParsedManifestText {
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const howTo = 'a manifest starts with a line `---`, then YAML fields, then a closing `---` line';
  // 1. Opening line and language tag.
  const firstBreak = src.search(/\r?\n/);
  const opening = firstBreak === -1 ? src : src.slice(0, firstBreak);
  if (!opening.startsWith('---') || opening.startsWith('----')) {
    throw new InputError('no front matter found', { file, line: 1, hint: howTo });
  }
  const tag = opening.slice(3).trim();
  if (tag !== '' && tag.toLowerCase() !== 'yaml' && tag.toLowerCase() !== 'yml') {
    throw new InputError(`front matter language is ${JSON.stringify(tag)}; allowed: YAML only (a bare \`---\` line). Manifests are data: no code in them runs`, {
      file,
      line: 1,
    });
  }
  // 2. Closing line and size.
  const afterOpen = firstBreak === -1 ? '' : src.slice(firstBreak);
  // The same rule as gray-matter: the block ends at the first line that starts with `---`.
  const close = afterOpen.indexOf('\n---');
  if (close === -1) throw new InputError('front matter is not closed by a `---` line', { file, line: 1, hint: howTo });
  const frontBytes = Buffer.byteLength(afterOpen.slice(0, close), 'utf8');
  if (frontBytes > MAX_FRONT_MATTER_BYTES) {
    throw new InputError(`front matter is ${frontBytes} bytes; allowed: at most ${MAX_FRONT_MATTER_BYTES} bytes (256 KiB)`, { file, line: 1 });
  }

  // 3–4. Split with locked engines; our YAML engine records the block for line lookups.
  const refuse = () => {
    throw new InputError('front matter language is not YAML; no code in a manifest runs', { file, line: 1 });
  };
  let block = '';
  const yamlEngine = (str: string): unknown => {
    block = str;
    checkYamlDepth(str, file); // before the parser recurses; `str` starts with the newline that ends line 1
    return loadYaml(str, file);
  };
  const engines = { yaml: yamlEngine, yml: yamlEngine, js: refuse, javascript: refuse, coffee: refuse, coffeescript: refuse, cson: refuse, json: refuse };
  // Options are always passed, so gray-matter's text-keyed cache is never used.
  const parsed = matter(src, { engines, language: 'yaml', excerpt: false } as never) as unknown as { data: unknown; content: string; isEmpty: boolean };
  const data = parsed.isEmpty ? {} : parsed.data;
  if (data === null || typeof data !== 'object' || Array.isArray(data)) {
    throw new InputError(`front matter is ${Array.isArray(data) ? 'a list' : 'a single value'}; allowed: a mapping of fields (\`name: value\` lines)`, { file, line: 2 });
  }
  // The YAML block begins right after `---` on line 1, so block line i is file line i + 1.
  const lineOf = makeLineOf(block, 1);
  return { data, body: parsed.content, lineOf };
}

function loadYaml(str: string, file: string): unknown {
  const listener = (_event: 'open' | 'close', state: YamlState) => {
    if (typeof state.anchor === 'string') throw new AnchorRefused(state.anchor, state.line);
  };
  try {
    return yaml.load(str, { schema: yaml.CORE_SCHEMA, filename: file, listener });
  } catch (err) {
    if (err instanceof AnchorRefused) {
      throw new InputError(`YAML anchor &${err.anchor} found; allowed: plain values (anchors, aliases and merge keys are not supported in manifests)`, {
        file,
        line: err.yamlLine + 1,
      });
    }
    if (err instanceof yaml.YAMLException) {
      const line = err.mark ? err.mark.line + 1 : undefined;
      const reason = err.reason ?? err.message;
      // A missing `}` or `]` is noticed only lines later: name the line the collection opened on.
      const open = err.mark?.position !== undefined ? unclosedFlowAt(str, err.mark.position) : null;
      if (open && line !== undefined) {
        const name = open.bracket === '{' ? 'flow mapping `{`' : 'flow sequence `[`';
        throw new InputError(`YAML error: the ${name} opened on line ${open.line + 1} is not closed; the parser gave up on line ${line} (${reason})`, {
          file,
          line: open.line + 1,
          hint: `close it with \`${open.bracket === '{' ? '}' : ']'}\` on line ${open.line + 1}`,
          cause: err,
        });
      }
      const tagHint = /unknown tag/.test(reason) ? 'tags such as !!js/function or !custom are not allowed: manifests are plain data' : undefined;
      throw new InputError(`YAML error: ${reason}`, { file, line, hint: tagHint, cause: err });
    }
    throw err;
  }
}
