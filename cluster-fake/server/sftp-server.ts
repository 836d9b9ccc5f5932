import fs from "node:fs";
import fsp from "node:fs/promises";
import ssh2 from "ssh2";
import type { Attributes, FileEntry, SFTPWrapper } from "ssh2";
import type { Logger } from "pino";
import { JailError, SftpJail } from "./sftp-jail.js";

const { OPEN_MODE, STATUS_CODE } = ssh2.utils.sftp;

type Handle =
  | { kind: "file"; fh: fsp.FileHandle; clientPath: string }
  | { kind: "dir"; clientPath: string; hostPath: string; sent: boolean };

function toAttrs(st: fs.Stats): Attributes {
  return {
    mode: st.mode, uid: st.uid, gid: st.gid, size: st.size,
    atime: Math.floor(st.atimeMs / 1000), mtime: Math.floor(st.mtimeMs / 1000),
  };
}

/** SFTP open flags to fs flags; O_NOFOLLOW so a symlink swapped in after the check still fails. */
function openFlags(pflags: number): number {
  const c = fs.constants;
  const rw = pflags & OPEN_MODE.READ && pflags & OPEN_MODE.WRITE ? c.O_RDWR
    : pflags & OPEN_MODE.WRITE ? c.O_WRONLY : c.O_RDONLY;
  return rw | c.O_NOFOLLOW
    | (pflags & OPEN_MODE.CREAT ? c.O_CREAT : 0)
    | (pflags & OPEN_MODE.TRUNC ? c.O_TRUNC : 0)
    | (pflags & OPEN_MODE.EXCL ? c.O_EXCL : 0)
    | (pflags & OPEN_MODE.APPEND ? c.O_APPEND : 0);
}

function longname(name: string, st: fs.Stats): string {
  const type = st.isDirectory() ? "d" : st.isSymbolicLink() ? "l" : "-";
  const perms = (st.mode & 0o777).toString(8).padStart(3, "0");
  return `${type}${perms} 1 ${st.uid} ${st.gid} ${st.size} ${new Date(st.mtimeMs).toISOString()} ${name}`;
}

function statusFor(err: unknown): [number, string] {
  if (err instanceof JailError) return [STATUS_CODE.PERMISSION_DENIED, err.message];
  const e = err as NodeJS.ErrnoException;
  switch (e.code) {
    case "ENOENT": return [STATUS_CODE.NO_SUCH_FILE, "no such file"];
    case "EACCES": case "EPERM": return [STATUS_CODE.PERMISSION_DENIED, "permission denied"];
    case "ELOOP": return [STATUS_CODE.PERMISSION_DENIED, "symbolic links are refused"];
    default: return [STATUS_CODE.FAILURE, e.code ?? e.message];
  }
}

/** Serve one SFTP session confined to the jail. Supports what staging and fetching need. */
export function serveSftp(sftp: SFTPWrapper, jail: SftpJail, log: Logger, onOp: () => void): void {
  const handles = new Map<string, Handle>();
  let nextHandle = 0;
  const newHandle = (h: Handle): Buffer => {
    const buf = Buffer.alloc(4);
    buf.writeUInt32BE(nextHandle++);
    handles.set(buf.toString("hex"), h);
    return buf;
  };
  const fileOf = (buf: Buffer) => {
    const h = handles.get(buf.toString("hex"));
    if (!h || h.kind !== "file") throw Object.assign(new Error("bad handle"), { code: "EBADF" });
    return h;
  };
  const reply = (reqid: number, op: string, fn: () => Promise<void>) => {
    onOp();
    fn().catch((err: unknown) => {
      const [code, msg] = statusFor(err);
      if (err instanceof JailError) log.warn({ op, err: err.message }, "sftp path refused");
      sftp.status(reqid, code, msg);
    });
  };
  const ok = (reqid: number) => sftp.status(reqid, STATUS_CODE.OK);

  sftp.on("OPEN", (reqid, filename, flags, attrs) => reply(reqid, "OPEN", async () => {
    const p = jail.resolve(filename);
    const fh = await fsp.open(p.hostPath, openFlags(flags), attrs?.mode ?? 0o644);
    sftp.handle(reqid, newHandle({ kind: "file", fh, clientPath: p.clientPath }));
  }));
  sftp.on("READ", (reqid, handle, offset, length) => reply(reqid, "READ", async () => {
    const buf = Buffer.alloc(Math.min(length, 256 * 1024));
    const { bytesRead } = await fileOf(handle).fh.read(buf, 0, buf.length, offset);
    if (bytesRead === 0) sftp.status(reqid, STATUS_CODE.EOF);
    else sftp.data(reqid, buf.subarray(0, bytesRead));
  }));
  sftp.on("WRITE", (reqid, handle, offset, data) => reply(reqid, "WRITE", async () => {
    await fileOf(handle).fh.write(data, 0, data.length, offset);
    ok(reqid);
  }));
  sftp.on("FSTAT", (reqid, handle) => reply(reqid, "FSTAT", async () => {
    sftp.attrs(reqid, toAttrs(await fileOf(handle).fh.stat()));
  }));
  sftp.on("FSETSTAT", (reqid, handle, attrs) => reply(reqid, "FSETSTAT", async () => {
    // Only the mode is honoured; owner and times mean nothing on the fake node.
    if (attrs.mode !== undefined) await fileOf(handle).fh.chmod(attrs.mode & 0o777);
    ok(reqid);
  }));
  sftp.on("SETSTAT", (reqid, filename, attrs) => reply(reqid, "SETSTAT", async () => {
    const p = jail.resolve(filename);
    if (attrs.mode !== undefined) await fsp.chmod(p.hostPath, attrs.mode & 0o777);
    ok(reqid);
  }));
  sftp.on("CLOSE", (reqid, handle) => reply(reqid, "CLOSE", async () => {
    const key = handle.toString("hex");
    const h = handles.get(key);
    if (!h) throw Object.assign(new Error("bad handle"), { code: "EBADF" });
    handles.delete(key);
    if (h.kind === "file") await h.fh.close();
    ok(reqid);
  }));
  sftp.on("OPENDIR", (reqid, dirPath) => reply(reqid, "OPENDIR", async () => {
    const p = jail.resolve(dirPath);
    if (!(await fsp.stat(p.hostPath)).isDirectory()) throw Object.assign(new Error("not a dir"), { code: "ENOTDIR" });
    sftp.handle(reqid, newHandle({ kind: "dir", clientPath: p.clientPath, hostPath: p.hostPath, sent: false }));
  }));
  sftp.on("READDIR", (reqid, handle) => reply(reqid, "READDIR", async () => {
    const h = handles.get(handle.toString("hex"));
    if (!h || h.kind !== "dir") throw Object.assign(new Error("bad handle"), { code: "EBADF" });
    if (h.sent) return void sftp.status(reqid, STATUS_CODE.EOF);
    h.sent = true;
    const names = await fsp.readdir(h.hostPath);
    // lstat: a symlink is listed as a symlink, so the client can see (and refuse) it.
    const entries: FileEntry[] = await Promise.all(names.map(async (name) => {
      const st = await fsp.lstat(`${h.hostPath}/${name}`);
      return { filename: name, longname: longname(name, st), attrs: toAttrs(st) } as FileEntry;
    }));
    if (entries.length === 0) sftp.status(reqid, STATUS_CODE.EOF);
    else sftp.name(reqid, entries);
  }));
  const statOp = (op: "STAT" | "LSTAT") => (reqid: number, filename: string) => reply(reqid, op, async () => {
    const p = jail.resolve(filename);
    sftp.attrs(reqid, toAttrs(await (op === "STAT" ? fsp.stat : fsp.lstat)(p.hostPath)));
  });
  sftp.on("STAT", statOp("STAT"));
  sftp.on("LSTAT", statOp("LSTAT"));
  sftp.on("REALPATH", (reqid, filename) => reply(reqid, "REALPATH", async () => {
    const p = jail.resolve(filename);
    sftp.name(reqid, [{ filename: p.clientPath, longname: p.clientPath, attrs: {} as Attributes }]);
  }));
  sftp.on("MKDIR", (reqid, dirPath, attrs) => reply(reqid, "MKDIR", async () => {
    await fsp.mkdir(jail.resolve(dirPath).hostPath, { mode: attrs?.mode ?? 0o755 });
    ok(reqid);
  }));
  sftp.on("RMDIR", (reqid, dirPath) => reply(reqid, "RMDIR", async () => {
    const p = jail.resolve(dirPath);
    if (p.clientPath === "/") throw new JailError(dirPath, "the work root cannot be removed");
    await fsp.rmdir(p.hostPath);
    ok(reqid);
  }));
  sftp.on("REMOVE", (reqid, filename) => reply(reqid, "REMOVE", async () => {
    await fsp.unlink(jail.resolve(filename).hostPath);
    ok(reqid);
  }));
  sftp.on("RENAME", (reqid, oldPath, newPath) => reply(reqid, "RENAME", async () => {
    // POSIX rename (replaces the target), unlike SFTP v3's fail-if-exists: staging wants replace.
    await fsp.rename(jail.resolve(oldPath).hostPath, jail.resolve(newPath).hostPath);
    ok(reqid);
  }));
  for (const op of ["SYMLINK", "READLINK"] as const) {
    sftp.on(op, (reqid: number) => {
      onOp();
      sftp.status(reqid, STATUS_CODE.OP_UNSUPPORTED, "symbolic links are not supported on this node");
    });
  }
  // The client half-closes (EOF) when done; close our side too or OpenSSH's sftp waits forever.
  sftp.on("end", () => sftp.end());
  sftp.on("close", () => {
    for (const h of handles.values()) if (h.kind === "file") void h.fh.close().catch(() => {});
    handles.clear();
  });
}
