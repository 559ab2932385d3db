/**
 * PostgreSQL's COPY … FROM STDIN through Kysely, inside whatever transaction the caller holds. Kysely hands a
 * query's text and parameters to the pg client of its connection; the pool's clients (CopyingClient) read a
 * query whose one parameter is a CopySource as a COPY and stream the rows through pg-copy-streams on that same
 * connection. So a repository writes `await copyRows(trx, 'readings', columns, rows)` and the rows land in the
 * transaction of `trx`, committed or rolled back with the rest of it.
 */
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { CompiledQuery, type Kysely } from 'kysely';
import pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';

/** A value of one COPY column: null is NULL, numbers go in their shortest exact decimal form. */
export type CopyValue = string | number | null;

/** Rows handed to COPY, in batches of text per write (the rows are never one string in memory). */
export class CopySource {
  constructor(readonly rows: Iterable<readonly CopyValue[]>) {}

  /** pg calls this to send a parameter: reached only on a client that is not a CopyingClient, which is a bug. */
  toPostgres(): never {
    throw new Error('copyRows needs a connection from a pool whose clients are CopyingClient (createDb makes one)');
  }

  /** The rows in COPY's text format, about 64 KB per chunk. */
  *chunks(): Generator<string> {
    let chunk = '';
    for (const row of this.rows) {
      let line = '';
      for (let i = 0; i < row.length; i += 1) {
        if (i > 0) line += '\t';
        line += encodeCopyValue(row[i]!);
      }
      chunk += `${line}\n`;
      if (chunk.length >= 65_536) {
        yield chunk;
        chunk = '';
      }
    }
    if (chunk.length > 0) yield chunk;
  }
}

/**
 * One value in COPY's text format (PostgreSQL documentation, COPY, "Text Format"): \N is NULL; backslash, tab,
 * newline and carriage return are escaped with a backslash.
 */
export function encodeCopyValue(value: CopyValue): string {
  if (value === null) return '\\N';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) throw new Error(`COPY cannot write ${value}`);
    return String(value);
  }
  return /[\\\t\n\r]/.test(value)
    ? value.replace(/[\\\t\n\r]/g, (c) => (c === '\\' ? '\\\\' : c === '\t' ? '\\t' : c === '\n' ? '\\n' : '\\r'))
    : value;
}

const IDENTIFIER = /^[a-z_][a-z0-9_]*$/;

/**
 * COPY the rows into `table` (its `columns`, in order) on the connection of `db`: inside a transaction, as part
 * of it. Returns the number of rows PostgreSQL took. Table and column names are code, never input.
 */
export async function copyRows(
  db: Kysely<any>,
  table: string,
  columns: readonly string[],
  rows: Iterable<readonly CopyValue[]>,
): Promise<number> {
  for (const name of [table, ...columns])
    if (!IDENTIFIER.test(name)) throw new Error(`not a plain identifier: ${name}`);
  const statement = `copy ${table} (${columns.join(', ')}) from stdin`;
  const result = await db.executeQuery(CompiledQuery.raw(statement, [new CopySource(rows)]));
  return Number(result.numAffectedRows ?? (result.rows[0] as { rowCount?: number } | undefined)?.rowCount ?? 0);
}

interface QueryAnswer {
  command: string;
  rowCount: number;
  rows: { rowCount: number }[];
}

/**
 * pg's client, with one addition: a query whose only parameter is a CopySource runs as COPY FROM STDIN, its
 * rows streamed (pg-copy-streams). Everything else is pg's own query.
 */
export class CopyingClient extends pg.Client {
  // pg's query has many overloads; this one only looks at the (text, [CopySource]) form Kysely sends.
  override query(...args: unknown[]): any {
    const [text, values] = args;
    if (typeof text === 'string' && Array.isArray(values) && values.length === 1 && values[0] instanceof CopySource) {
      return this.copyIn(text, values[0]);
    }
    return (super.query as (...a: unknown[]) => unknown)(...args);
  }

  private async copyIn(statement: string, source: CopySource): Promise<QueryAnswer> {
    const stream = (super.query as (s: unknown) => ReturnType<typeof copyFrom>)(copyFrom(statement));
    await pipeline(Readable.from(source.chunks()), stream);
    const rowCount = stream.rowCount ?? 0;
    return { command: 'COPY', rowCount, rows: [{ rowCount }] };
  }
}
