import "server-only";
// Stream a run's series into the series table with COPY, in chunks of float8[], on the transaction's connection.
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import type pg from "pg";
import copyStreams from "pg-copy-streams";
import type { Transaction } from "sequelize";

/** Values per Series row: 32 KiB of float8, so a 10^5-sweep column is 25 rows and one read loads it. */
export const CHUNK_VALUES = 4096;

// Keep each write to the COPY stream around this size: fewer, larger writes are faster.
const WRITE_BYTES = 1 << 18;

/** The pg client under a Sequelize 6 transaction (Transaction keeps it as `connection`). */
export function pgClientOf(transaction: Transaction): pg.ClientBase {
  const client = (transaction as unknown as { connection?: pg.ClientBase }).connection;
  if (!client || typeof client.query !== "function") throw new Error("the transaction has no pg connection (Sequelize internals changed?)");
  return client;
}

/** COPY text lines of one run's series: one row per chunk of `chunk` values per column. */
export function* seriesCopyText(runId: string, columns: readonly string[], values: readonly Float64Array[], chunk = CHUNK_VALUES): Generator<string> {
  let buffer = "";
  for (let c = 0; c < columns.length; c++) {
    const column = values[c];
    for (let start = 0, index = 0; start < column.length; start += chunk, index++) {
      // Array.prototype.join uses Number#toString: the shortest text that reads back to the same double.
      const text = Array.prototype.join.call(column.subarray(start, start + chunk), ",");
      buffer += `${runId}\t${columns[c]}\t${index}\t${start}\t{${text}}\n`;
      if (buffer.length >= WRITE_BYTES) {
        yield buffer;
        buffer = "";
      }
    }
  }
  if (buffer) yield buffer;
}

/**
 * COPY every column (the sweep column included) into `series` inside `transaction`. Names were
 * checked against a plain identifier pattern, so they need no COPY escaping. Returns rows written.
 */
export async function copySeries(
  transaction: Transaction, runId: string, columns: readonly string[], values: readonly Float64Array[], table = "series",
): Promise<number> {
  const client = pgClientOf(transaction);
  const sink = client.query(copyStreams.from(`COPY ${table} (run_id, observable, chunk_index, start_row, "values") FROM STDIN`));
  await pipeline(Readable.from(seriesCopyText(runId, columns, values)), sink);
  return sink.rowCount;
}
