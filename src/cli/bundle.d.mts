// Types for bundle.mjs (plain JavaScript so that `npm run solve` checks freshness without a compiler).
export declare const ROOT: string;
export declare const OUT_DIR: string;
export declare function bundlePath(outDir?: string): string;
export declare function staleness(outDir?: string): string | null;
export declare function bundleCli(outDir?: string): Promise<string>;
