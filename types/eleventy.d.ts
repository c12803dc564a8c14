// Eleventy ships no type declarations; this covers the programmatic API we use.
declare module "@11ty/eleventy" {
  interface EleventyUserConfig {
    addGlobalData(name: string, value: unknown): void;
    [key: string]: unknown;
  }
  interface EleventyOptions {
    configPath?: string;
    quietMode?: boolean;
    source?: "cli" | "script";
    config?: (config: EleventyUserConfig) => void;
  }
  export class Eleventy {
    constructor(input: string, output: string, options?: EleventyOptions);
    write(): Promise<unknown>;
    /** Silences Eleventy's console output, including the "Wrote N files" summary quiet mode keeps. */
    disableLogger(): void;
    toJSON(): Promise<{ url: string; inputPath: string; outputPath: string; content: string }[]>;
  }
  export default Eleventy;
}
