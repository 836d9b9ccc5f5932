import ssh2 from "ssh2";

/**
 * An ed25519 key pair in OpenSSH format that ssh2 itself can read back.
 * ssh2's generateKeyPairSync("ed25519") now and then (about 1 in 400 here) writes a private key its own
 * parser refuses; drawing again is cheaper than carrying a second key library.
 */
export function generateSshKeyPair(comment: string): { private: string; public: string } {
  for (let attempt = 0; attempt < 50; attempt++) {
    const pair = ssh2.utils.generateKeyPairSync("ed25519", { comment });
    if (!(ssh2.utils.parseKey(pair.private) instanceof Error)) return pair;
  }
  throw new Error("could not generate an ed25519 key pair that ssh2 can parse");
}
