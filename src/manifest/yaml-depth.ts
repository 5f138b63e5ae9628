/**
 * Refuse deeply nested YAML before the parser sees it.
 *
 * js-yaml parses nested collections by recursion, so a front matter of `[[[[…` 3,000 deep (a few
 * kilobytes, well under the size limit) overflows the stack: a crash, not an error. This scan
 * runs first, in one pass over the text, and bounds the nesting any collection could reach at
 * each line:
 *   - flow collections: `[` and `{` outside quoted scalars and comments open a level, `]` and `}`
 *     close one (carried across lines, since flow collections may span lines);
 *   - block collections: one level per indentation step of the line (a stack of the indents
 *     seen on the way in), plus one per compact `- ` or `? ` marker at the line's start (`- - x`
 *     nests a sequence in a sequence on one line).
 * Text in quoted scalars, comments and block scalars (`|`, `>`) is skipped. The count is an
 * upper bound of the parser's depth (it may count a level the parser would not make), so the
 * limit is set well above what a manifest needs (about 5: datasets → item → mapping → value).
 */
import { InputError } from '../errors.ts';

/** Deepest nesting accepted in a manifest's front matter. */
export const MAX_YAML_DEPTH = 64;

/**
 * Throws an InputError naming `file` and the line where the nesting first passes MAX_YAML_DEPTH.
 * Cost: linear in the text.
 */
export function checkYamlDepth(text: string, file: string): void {
  const lines = text.split('\n');
  const indents: number[] = []; // block indentation stack
  let flow = 0;
  let quote: '' | "'" | '"' = '';
  let blockScalarIndent = -1; // inside a block scalar: lines indented more than this are text
  for (let li = 0; li < lines.length; li++) {
    const line = lines[li];
    let i = 0;
    while (i < line.length && line[i] === ' ') i++;
    const blank = i === line.length || line[i] === '#' || line[i] === '\r';
    if (blockScalarIndent >= 0) {
      if (blank || i > blockScalarIndent) continue;
      blockScalarIndent = -1;
    }
    if (blank && quote === '') continue;
    let depth = 0;
    if (flow === 0 && quote === '') {
      while (indents.length && indents[indents.length - 1] >= i) indents.pop();
      indents.push(i);
      depth = indents.length;
      // Compact nested entries at the start of the line: `- - x`, `? - x`.
      while (i < line.length && (line[i] === '-' || line[i] === '?') && (line[i + 1] === ' ' || i + 1 === line.length)) {
        depth++;
        i += 2;
        while (i < line.length && line[i] === ' ') i++;
      }
    }
    let lineFlowMax = flow;
    let end = line.length; // where the line's comment starts
    // A quote or bracket starts a scalar or collection only where a value starts (after `: `,
    // `- `, `, `, `[`, `{`, `? ` or at the start); elsewhere it is part of a plain scalar
    // (`title: Kenyon's cells`, `note: see [1`), outside flow collections.
    let prev = '';
    for (; i < line.length; i++) {
      const c = line[i];
      const spaced = i > 0 && (line[i - 1] === ' ' || line[i - 1] === '\t');
      const startsValue = prev === '' || prev === ',' || prev === '[' || prev === '{' || ((prev === ':' || prev === '-' || prev === '?') && spaced);
      if (quote === '"') {
        if (c === '\\') i++;
        else if (c === '"') quote = '';
      } else if (quote === "'") {
        if (c === "'") {
          if (line[i + 1] === "'") i++;
          else quote = '';
        }
      } else if (c === '#' && (i === 0 || line[i - 1] === ' ' || line[i - 1] === '\t')) {
        end = i;
        break;
      } else if ((c === '"' || c === "'") && startsValue) {
        quote = c;
      } else if ((c === '[' || c === '{') && (flow > 0 || startsValue)) {
        flow++;
        if (flow > lineFlowMax) lineFlowMax = flow;
      } else if ((c === ']' || c === '}') && flow > 0) {
        flow--;
      }
      if (quote === '' && c !== ' ' && c !== '\t') prev = c;
    }
    if (depth + lineFlowMax > MAX_YAML_DEPTH) {
      throw new InputError(`YAML is nested ${depth + lineFlowMax} or more levels deep here; allowed: at most ${MAX_YAML_DEPTH} levels`, {
        file,
        line: li + 1,
        hint: 'a manifest needs about 5 levels: datasets, an item, its fields; remove the extra brackets or indentation',
      });
    }
    // A block scalar header (`key: |`, `- >-`, `|2`) starts text that is not YAML structure.
    if (quote === '' && flow === 0 && /(^|\s)[|>][1-9+-]{0,2}\s*$/.test(line.slice(0, end))) {
      let ind = 0;
      while (ind < line.length && line[ind] === ' ') ind++;
      blockScalarIndent = ind;
    }
  }
}
