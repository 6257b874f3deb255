/** This process's peak resident memory in MiB (see peak.mjs). */
export declare function peakMiB(): number;
