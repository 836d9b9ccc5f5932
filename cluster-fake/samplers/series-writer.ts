/** Buffered writer of the measurement series (csv or f64le), resumable at a byte offset. */
import fs from "node:fs";

/** The two series encodings of DESIGN.md. */
export type Encoding = "csv" | "f64le";

/** File name of the series for an encoding. */
export function seriesFileName(encoding: Encoding): string {
  return encoding === "csv" ? "series.csv" : "series.f64le";
}

const FLUSH_BYTES = 1 << 18;

/** Appends rows `sweep, obs...` to the series file. */
export class SeriesWriter {
  private fd: number;
  private bytes: number;
  private text: string[] = [];
  private textBytes = 0;
  private bin: Float64Array;
  private binFill = 0;
  rows: number;

  /** Open for a fresh run (truncate, write header) or resume at `resumeAt` bytes / rows. */
  constructor(
    readonly file: string,
    readonly encoding: Encoding,
    readonly columns: readonly string[],
    resumeAt?: { bytes: number; rows: number },
  ) {
    this.bin = new Float64Array(Math.max(1, Math.floor(FLUSH_BYTES / 8 / columns.length)) * columns.length);
    if (resumeAt) {
      this.fd = fs.openSync(file, "r+");
      fs.ftruncateSync(this.fd, resumeAt.bytes);
      this.bytes = resumeAt.bytes;
      this.rows = resumeAt.rows;
    } else {
      this.fd = fs.openSync(file, "w");
      this.bytes = 0;
      this.rows = 0;
      if (encoding === "csv") this.writeRaw(Buffer.from(columns.join(",") + "\n"));
    }
  }

  private writeRaw(buf: Buffer | Uint8Array): void {
    let off = 0;
    while (off < buf.byteLength) off += fs.writeSync(this.fd, buf, off, buf.byteLength - off, this.bytes + off);
    this.bytes += buf.byteLength;
  }

  /** Append one row; `values` must be finite (a NaN is a sampler bug, not data). */
  append(sweep: number, values: Float64Array): void {
    for (let i = 0; i < values.length; i++) {
      if (!Number.isFinite(values[i])) {
        throw new Error(`observable ${this.columns[i + 1]} is ${values[i]} at sweep ${sweep}`);
      }
    }
    this.rows++;
    if (this.encoding === "csv") {
      let line = String(sweep);
      for (let i = 0; i < values.length; i++) line += "," + String(values[i]);
      line += "\n";
      this.text.push(line);
      this.textBytes += line.length; // ASCII only
      if (this.textBytes >= FLUSH_BYTES) this.flush();
    } else {
      this.bin[this.binFill++] = sweep;
      this.bin.set(values, this.binFill);
      this.binFill += values.length;
      if (this.binFill === this.bin.length) this.flush();
    }
  }

  /** Write buffered rows; returns the file's byte length. */
  flush(): number {
    if (this.text.length > 0) {
      this.writeRaw(Buffer.from(this.text.join(""), "latin1"));
      this.text = [];
      this.textBytes = 0;
    }
    if (this.binFill > 0) {
      const view = new Float64Array(this.bin.buffer, 0, this.binFill);
      const out = Buffer.alloc(this.binFill * 8);
      for (let i = 0; i < view.length; i++) out.writeDoubleLE(view[i], i * 8); // explicit little-endian
      this.writeRaw(out);
      this.binFill = 0;
    }
    return this.bytes;
  }

  /** Flush, fsync and close. */
  close(): number {
    const n = this.flush();
    fs.fsyncSync(this.fd);
    fs.closeSync(this.fd);
    return n;
  }
}
