/**
 * Wear chart answers kept in this process by their entity tag. The tag is made from a fingerprint of every row the
 * answer is built from (findTrendDataFingerprint), the query and the answer's format, so a kept answer is exactly
 * the one that would be built now: any write the chart would see gives a new tag, and the old answer is simply never
 * asked for again and ages out. Nothing is invalidated by hand, and several app processes each keep their own
 * without disagreeing. Keying a rendered answer by a version of its data is common practice (no published source).
 *
 * The answer is kept once it is built for anyone allowed to see the machine; it is found only through a tag, and
 * only a member of the machine's crew gets that tag (the fingerprint query checks the crew), so it reaches nobody
 * else. Bounded by bytes, least recently used out first.
 */
import { LRUCache } from 'lru-cache';
import { getConfig } from '../config';
import { preparedJsonBytes, type PreparedJson } from '../http/conditional-json';

const MEGABYTE = 1024 * 1024;

/**
 * CHART_CACHE_MB's default: 16 MB a process, counting text as two bytes a character, holds about 170 charts of 200
 * samples × 3 elements with their gzip and many more of the usual smaller ones. Sized against the app's memory, not
 * taken from a source.
 */
const DEFAULT_BYTES = 16 * MEGABYTE;

export interface TrendAnswers {
  get(etag: string): PreparedJson | undefined;
  keep(prepared: PreparedJson): void;
  /** Bytes held now (for tests and the benchmark). */
  readonly bytes: number;
}

/** An answer store of at most `maxBytes`; with 0 it keeps nothing. */
export function createTrendAnswers(maxBytes = DEFAULT_BYTES): TrendAnswers {
  if (maxBytes <= 0) return { get: () => undefined, keep: () => undefined, bytes: 0 };
  const cache = new LRUCache<string, PreparedJson>({
    maxSize: maxBytes,
    // Measured on each `keep`: the route keeps an answer again after sending it, so a gzip made on the way counts.
    sizeCalculation: (prepared) => Math.max(1, preparedJsonBytes(prepared)),
  });
  return {
    get: (etag) => cache.get(etag),
    keep(prepared) {
      // LRUCache measures a value when it is first set, not when the same value is set again: take it out first
      // so a gzip made since counts.
      if (cache.peek(prepared.etag) === prepared) cache.delete(prepared.etag);
      // An answer bigger than the whole store is sent but not kept (LRUCache refuses it).
      cache.set(prepared.etag, prepared);
    },
    get bytes() {
      return cache.calculatedSize;
    },
  };
}

let shared: TrendAnswers | undefined;

/** This process's store of wear chart answers, of CHART_CACHE_MB. */
export function getTrendAnswers(): TrendAnswers {
  shared ??= createTrendAnswers(getConfig().CHART_CACHE_MB * MEGABYTE);
  return shared;
}
