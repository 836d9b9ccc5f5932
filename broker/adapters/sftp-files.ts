import fs from "node:fs/promises";
import path from "node:path";
import type { FileEntry } from "ssh2";
import ssh2 from "ssh2";
import type { SshConnection } from "./ssh-connection";
import { ClusterError } from "./errors";
import type { FetchedFile } from "./types";

const { STATUS_CODE } = ssh2.utils.sftp;
const S_IFMT = 0o170000;
const S_IFDIR = 0o040000;
const S_IFREG = 0o100000;

/**
 * Map over items with at most `limit` in flight. Hand-written (a few lines) because no
 * concurrency-limit package is installed; SFTP requests pipeline well on one session.
 */
export async function mapLimit<T, R>(items: T[], limit: number, fn: (item: T) => Promise<R>): Promise<R[]> {
  const out = new Array<R>(items.length);
  let next = 0;
  const worker = async () => {
    while (next < items.length) {
      const i = next++;
      out[i] = await fn(items[i]);
    }
  };
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, worker));
  return out;
}

/** mkdir that accepts an existing directory (checked with one extra stat only on failure). */
export async function ensureRemoteDir(conn: SshConnection, dir: string): Promise<void> {
  try {
    await conn.sftp<void>((s, cb) => s.mkdir(dir, cb));
  } catch (err) {
    const st = await conn.sftp<ssh2.Stats>((s, cb) => s.stat(dir, cb)).catch(() => null);
    if (!st?.isDirectory()) throw new ClusterError(`cannot create ${dir} on the cluster: ${(err as Error).message}`, "sftp", false, { cause: err });
  }
}

/** A name from a remote listing that is safe to use as one local path segment. */
function safeName(name: string, where: string): string {
  if (name === "" || name === "." || name === ".." || /[/\\\0]/.test(name)) {
    throw new ClusterError(`refusing remote file name "${name}" in ${where}`, "bad_bundle", false);
  }
  return name;
}

/** Download a remote directory tree; only regular files and directories are accepted. */
export async function downloadDir(conn: SshConnection, remoteDir: string, localDir: string): Promise<FetchedFile[]> {
  const files: FetchedFile[] = [];
  const walk = async (remote: string, local: string, rel: string): Promise<void> => {
    await fs.mkdir(local, { recursive: true });
    let entries: FileEntry[];
    try {
      entries = await conn.sftp<FileEntry[]>((s, cb) => s.readdir(remote, cb));
    } catch (err) {
      const code = (err as { code?: number }).code;
      throw new ClusterError(code === STATUS_CODE.NO_SUCH_FILE ? `no result folder at ${remote} on the cluster`
        : `cannot list ${remote}: ${(err as Error).message}`, code === STATUS_CODE.NO_SUCH_FILE ? "no_bundle" : "sftp", false, { cause: err });
    }
    const regular: { remote: string; local: string; rel: string; size: number }[] = [];
    for (const e of entries) {
      const name = safeName(e.filename, remote);
      const type = (e.attrs.mode ?? 0) & S_IFMT;
      const child = { remote: `${remote}/${name}`, local: path.join(local, name), rel: rel ? `${rel}/${name}` : name };
      if (type === S_IFDIR) await walk(child.remote, child.local, child.rel);
      else if (type === S_IFREG) regular.push({ ...child, size: e.attrs.size ?? 0 });
      else throw new ClusterError(`${child.remote} is neither a file nor a directory: refusing the bundle`, "bad_bundle", false);
    }
    await mapLimit(regular, 4, async (f) => {
      await conn.sftp<void>((s, cb) => s.fastGet(f.remote, f.local, cb));
      const st = await fs.stat(f.local);
      files.push({ path: f.rel, bytes: st.size });
    });
  };
  await walk(remoteDir.replace(/\/+$/, ""), localDir, "");
  return files.sort((a, b) => a.path.localeCompare(b.path));
}
