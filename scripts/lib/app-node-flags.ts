/**
 * Node (V8) flags of every app process, and of the import benchmark's child, which stands for one.
 *
 * --heap-growing-percent=50: after a full collection V8 lets the old generation grow to 1.5 × what survived
 * before the next one, instead of up to 4 × (V8's heap-growing heuristics, src/heap/heap-controller.cc). An app
 * process keeps little alive (about 25 MB during a 10,000-row lab import), so a full collection takes 10–25 ms
 * either way; at 4 × the garbage a big import leaves between collections lifted the process's peak memory by
 * 100 MB and more, and whether it did depended on when the last collection fell. Measured with
 * tests/bench/import.bench.ts (peak RSS) and tests/bench/load.bench.ts (throughput).
 */
export const APP_NODE_FLAGS: readonly string[] = ['--heap-growing-percent=50'];
