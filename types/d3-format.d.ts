/** d3-format (installed with Vega, which formats axis labels with it): only what the tests use. */
declare module 'd3-format' {
  export function format(specifier: string): (n: number) => string;
}
