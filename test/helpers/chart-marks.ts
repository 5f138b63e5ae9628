/**
 * Every object with a `mark` in a Vega-Lite spec (layers, concatenations and the top level),
 * found by walking the spec; inline `data` is not walked (rows hold no marks). For tests that
 * check what a chart draws.
 */
export function specMarks(spec: unknown): Record<string, any>[] {
  const out: Record<string, any>[] = [];
  const walk = (v: unknown) => {
    if (Array.isArray(v)) v.forEach(walk);
    else if (v && typeof v === 'object') {
      const o = v as Record<string, any>;
      if ('mark' in o) out.push(o);
      for (const [k, x] of Object.entries(o)) if (k !== 'data') walk(x);
    }
  };
  walk(spec);
  return out;
}
