/** How a run uses the machine; never what it computes (the results are the same for any choice). */
export interface EngineOptions {
  /** Memory for a chunk of years of mixes (default CHUNK_BYTES, chunk-years.ts). */
  readonly chunkBytes?: number;
  /** Threads (threads.ts: default, every core for large runs, one for small ones). */
  readonly threads?: number;
}
