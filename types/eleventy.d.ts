/**
 * The small part of Eleventy 3's programmatic API that Lacuna uses. `@11ty/eleventy` ships no
 * types for its default export, so this shim declares only what `src/report/eleventy.ts` calls;
 * anything else should be added here with the same care (signatures from Eleventy 3.1 source).
 */
declare module '@11ty/eleventy' {
  /** A front matter engine: gray-matter calls `parse` with the raw front matter text. */
  export interface FrontMatterEngine {
    parse(input: string, options?: unknown): unknown;
  }

  /** The configuration object handed to `config(cfg)` callbacks and to `.eleventy.js`. */
  export interface EleventyUserConfig {
    /** Globs Eleventy skips, relative to the working directory. */
    ignores: Set<string>;
    addGlobalData(name: string, value: unknown): EleventyUserConfig;
    setFrontMatterParsingOptions(options: { engines?: Record<string, FrontMatterEngine>; [key: string]: unknown }): void;
    setNunjucksEnvironmentOptions(options: Record<string, unknown>): void;
    setTemplateFormats(formats: string[] | string): void;
    setUseGitIgnore(enabled: boolean): void;
    setDataFileSuffixes(suffixes: string[]): void;
    setDataDirectory(dir: string): void;
    setIncludesDirectory(dir: string): void;
    setLayoutsDirectory(dir: string): void;
    setQuietMode(quiet: boolean): void;
    addFilter(name: string, fn: (...args: never[]) => unknown): void;
  }

  export interface EleventyOptions {
    quietMode?: boolean;
    /** Path of a project config file; an empty string loads none. */
    configPath?: string;
    config?: (cfg: EleventyUserConfig) => void | Promise<void>;
  }

  /** One page as `toJSON()` reports it. */
  export interface EleventyPageJson {
    url: string | false;
    inputPath: string;
    outputPath: string | false;
    rawInput?: string;
    content: string;
  }

  export default class Eleventy {
    constructor(input?: string, output?: string, options?: EleventyOptions);
    write(): Promise<unknown>;
    toJSON(): Promise<EleventyPageJson[]>;
    /** Silence Eleventy's console output; errors are still thrown. */
    disableLogger(): void;
  }
}
