import fs from "node:fs";
import path from "node:path";

/** A client path that would leave the work root, or that goes through a symlink. */
export class JailError extends Error {
  constructor(clientPath: string, why: string) {
    super(`path "${clientPath}" refused: ${why}`);
    this.name = "JailError";
  }
}

/** A client path mapped into the work root. */
export interface JailedPath {
  /** Normalised client view, always absolute ("/" is the work root). */
  clientPath: string;
  hostPath: string;
}

/**
 * Confines SFTP paths to one directory, chroot style: "/" is the work root and relative
 * paths start there. ".." above the root is refused rather than clamped, so a client bug
 * shows up as an error instead of silently writing somewhere else. Symlinks are refused
 * wherever they appear: the node never creates any (SYMLINK is unsupported), so one in
 * the tree was planted, and refusing it is simpler and safer than chasing its target.
 */
export class SftpJail {
  readonly root: string;

  constructor(root: string) {
    fs.mkdirSync(root, { recursive: true });
    this.root = fs.realpathSync(root);
  }

  resolve(clientPath: string): JailedPath {
    if (clientPath.includes("\0")) throw new JailError(clientPath, "contains a NUL byte");
    const parts: string[] = [];
    for (const seg of clientPath.split("/")) {
      if (seg === "" || seg === ".") continue;
      if (seg === "..") {
        if (parts.length === 0) throw new JailError(clientPath, "escapes the work root");
        parts.pop();
      } else {
        parts.push(seg);
      }
    }
    let cur = this.root;
    for (const seg of parts) {
      cur = path.join(cur, seg);
      let st: fs.Stats;
      try {
        st = fs.lstatSync(cur);
      } catch {
        break; // the rest does not exist yet (e.g. a file being created)
      }
      if (st.isSymbolicLink()) throw new JailError(clientPath, "goes through a symbolic link");
    }
    return { clientPath: `/${parts.join("/")}`, hostPath: path.join(this.root, ...parts) };
  }
}
