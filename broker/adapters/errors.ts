/** Base of every error an adapter raises; `transient` says whether a retry with backoff may help. */
export class ClusterError extends Error {
  constructor(message: string, readonly code: string, readonly transient: boolean, options?: { cause?: unknown }) {
    super(message, options);
    this.name = "ClusterError";
  }
}

/**
 * The server's host key does not match the pinned fingerprint. Never transient: the caller
 * marks the cluster unhealthy and alerts the admins; nothing was sent to the server.
 */
export class HostKeyMismatchError extends ClusterError {
  constructor(readonly host: string, readonly expected: string, readonly actual: string) {
    super(`host key of ${host} is ${actual}, but ${expected} is pinned: refusing to connect`, "host_key_mismatch", false);
    this.name = "HostKeyMismatchError";
  }
}

/** The server refused our key. Not transient: someone has to fix authorized_keys or the key. */
export class ClusterAuthError extends ClusterError {
  constructor(host: string, cause: unknown) {
    super(`${host} refused our SSH key`, "auth_failed", false, { cause });
    this.name = "ClusterAuthError";
  }
}

/** Could not reach the server after every reconnect attempt. Transient. */
export class ClusterUnreachableError extends ClusterError {
  constructor(host: string, attempts: number, cause: unknown) {
    super(`cannot reach ${host} after ${attempts} attempts: ${(cause as Error)?.message ?? cause}`, "unreachable", true, { cause });
    this.name = "ClusterUnreachableError";
  }
}

/** A remote command did not answer in time. Transient, but the command may still have run. */
export class ExecTimeoutError extends ClusterError {
  constructor(command: string, ms: number) {
    super(`remote command "${command}" gave no answer within ${ms} ms`, "exec_timeout", true);
    this.name = "ExecTimeoutError";
  }
}

/** The remote side answered something that is not the protocol (bad JSON, error reply). */
export class ClusterProtocolError extends ClusterError {
  constructor(message: string, readonly exitCode: number | null = null) {
    super(message, "protocol", false);
    this.name = "ClusterProtocolError";
  }
}
