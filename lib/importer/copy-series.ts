import "server-only";
// Stream a run's series into the series table with binary COPY, in chunks of float8[], on the transaction's connection.
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import type pg from "pg";
import copyStreams from "pg-copy-streams";
import type { Transaction } from "sequelize";

/** Values per Series row: 32 KiB of float8, so a 10^5-sweep column is 25 rows and one read loads it. */
export const CHUNK_VALUES = 4096;

const FLOAT8_OID = 701;
const SIGNATURE = Buffer.from("PGCOPY\n\xff\r\n\0", "latin1");

/** The pg client under a Sequelize 6 transaction (Transaction keeps it as `connection`). */
export function pgClientOf(transaction: Transaction): pg.ClientBase {
  const client = (transaction as unknown as { connection?: pg.ClientBase }).connection;
  if (!client || typeof client.query !== "function") throw new Error("the transaction has no pg connection (Sequelize internals changed?)");
  return client;
}

function uuidBytes(id: string): Buffer {
  const hex = id.replace(/-/g, "");
  if (!/^[0-9a-f]{32}$/i.test(hex)) throw new Error(`not a uuid: ${id}`);
  return Buffer.from(hex, "hex");
}

/**
 * PostgreSQL binary COPY stream of one run's series (header, one tuple per chunk of `chunk`
 * values per column, trailer). Written by hand because no installed package encodes binary
 * COPY, and binary spares both sides the decimal conversion of every value — the text form
 * costs more than the rest of the COPY (see bench/import.ts). Layout per PostgreSQL's "COPY"
 * reference, binary format: int16 field count, then per field int32 length and the bytes.
 */
export function* seriesCopyBinary(runId: string, columns: readonly string[], values: readonly Float64Array[], chunk = CHUNK_VALUES): Generator<Buffer> {
  const header = Buffer.alloc(SIGNATURE.length + 8);
  SIGNATURE.copy(header);
  yield header; // flags and header-extension length are zero
  const id = uuidBytes(runId);
  for (let c = 0; c < columns.length; c++) {
    const name = Buffer.from(columns[c], "utf8");
    const column = values[c];
    for (let start = 0, index = 0; start < column.length; start += chunk, index++) {
      const n = Math.min(chunk, column.length - start);
      const arrayBytes = 20 + 12 * n;
      const buf = Buffer.allocUnsafe(2 + (4 + 16) + (4 + name.length) + 8 + 8 + 4 + arrayBytes);
      let o = buf.writeInt16BE(5, 0);
      o = buf.writeInt32BE(16, o); o += id.copy(buf, o);
      o = buf.writeInt32BE(name.length, o); o += name.copy(buf, o);
      o = buf.writeInt32BE(4, o); o = buf.writeInt32BE(index, o);
      o = buf.writeInt32BE(4, o); o = buf.writeInt32BE(start, o);
      o = buf.writeInt32BE(arrayBytes, o);
      o = buf.writeInt32BE(1, o); // dimensions
      o = buf.writeInt32BE(0, o); // no nulls
      o = buf.writeInt32BE(FLOAT8_OID, o);
      o = buf.writeInt32BE(n, o);
      o = buf.writeInt32BE(1, o); // lower bound
      for (let i = 0; i < n; i++) {
        o = buf.writeInt32BE(8, o);
        o = buf.writeDoubleBE(column[start + i], o);
      }
      yield buf;
    }
  }
  const trailer = Buffer.alloc(2);
  trailer.writeInt16BE(-1, 0);
  yield trailer;
}

let lz4: Promise<boolean> | undefined;

/**
 * Chunks of 32 KiB are TOASTed; PostgreSQL's default pglz compression of them costs about three
 * times the rest of the COPY (bench/import.ts), lz4 a small fraction at a somewhat larger size.
 * The column has no compression of its own, so the transaction-local default decides; servers
 * built without lz4 keep pglz.
 */
async function preferLz4(client: pg.ClientBase): Promise<void> {
  lz4 ??= client
    .query(`SELECT 'lz4' = ANY(enumvals) AS ok FROM pg_settings WHERE name = 'default_toast_compression'`)
    .then((r) => r.rows[0]?.ok === true, () => false);
  if (await lz4) await client.query(`SET LOCAL default_toast_compression = 'lz4'`);
}

/**
 * COPY every column (the sweep column included) into `table` (default series) inside
 * `transaction`, as binary chunks of float8[]. Returns the number of rows written.
 */
export async function copySeries(
  transaction: Transaction, runId: string, columns: readonly string[], values: readonly Float64Array[], table = "series",
): Promise<number> {
  const client = pgClientOf(transaction);
  await preferLz4(client);
  const sink = client.query(copyStreams.from(`COPY ${table} (run_id, observable, chunk_index, start_row, "values") FROM STDIN WITH (FORMAT binary)`));
  await pipeline(Readable.from(seriesCopyBinary(runId, columns, values)), sink);
  return sink.rowCount;
}
