#!/usr/bin/env bash
# Start a single-node batch scheduler (munged, slurmctld, slurmd) and an OpenSSH login node on
# 127.0.0.1 for Ergodex's tests. Idempotent: a daemon already running from this state dir is
# left alone. Must run as root. Prints the login node's host-key fingerprint and writes
# <state>/connection.json (host, port, user, key paths, fingerprint, partition, work root, sampler command).
set -euo pipefail
source "$(dirname "$0")/env.sh"

[ "$(id -u)" = 0 ] || { bc_log "must run as root (the daemons are root-started)"; exit 1; }

# --- packages -------------------------------------------------------------------------------
need=()
for pair in munged:munge slurmctld:slurmctld slurmd:slurmd sbatch:slurm-client sshd:openssh-server; do
  cmd=${pair%%:*}; pkg=${pair#*:}
  command -v "$cmd" >/dev/null 2>&1 || [ -x "/usr/sbin/$cmd" ] || need+=("$pkg")
done
if [ ${#need[@]} -gt 0 ]; then
  bc_log "installing ${need[*]}"
  apt-get update -q >/dev/null
  DEBIAN_FRONTEND=noninteractive apt-get install -y -q "${need[@]}" >/dev/null
fi

# --- cluster user ---------------------------------------------------------------------------
if ! id "$BC_USER" >/dev/null 2>&1; then
  useradd --create-home --shell /bin/bash "$BC_USER"
fi
# A new account is locked ("!") and sshd refuses it even for key logins; "*" = no password, not locked.
usermod -p '*' "$BC_USER"
HOME_DIR=$(getent passwd "$BC_USER" | cut -d: -f6)
WORK_ROOT="$HOME_DIR/ergodex/$BC_CLUSTER/runs"
SAMPLERS="$HOME_DIR/ergodex/$BC_CLUSTER/samplers"
runuser -u "$BC_USER" -- mkdir -p "$WORK_ROOT" "$HOME_DIR/.ssh"
chmod 700 "$HOME_DIR/.ssh"

# --- state dir layout -----------------------------------------------------------------------
mkdir -p "$BC_STATE"/{munge,slurmctld,run,log,ssh,keys}
chmod 755 "$BC_STATE"
chmod 700 "$BC_STATE"/{munge,keys}
PUB=$(bc_public_dir)
mkdir -p "$PUB/munge" "$PUB/slurmd"
chmod 755 "$PUB" "$PUB/munge" "$PUB/slurmd"
# munged needs every folder above its socket traversable by the clients (the cluster user too).
d=$PUB
while [ "$d" != / ]; do
  runuser -u "$BC_USER" -- test -x "$d" || { bc_log "$d is not traversable by $BC_USER; set ERGODEX_BATCH_STATE_DIR elsewhere"; exit 1; }
  d=$(dirname "$d")
done
MUNGE_SOCKET="$PUB/munge/munge.socket"
SLURM_CONF="$PUB/slurm.conf"
export SLURM_CONF

# --- install the samplers on the cluster, as a site would ------------------------------------
# A copy in the cluster user's home, so the checkout's own permissions do not matter. node_modules
# is hard-linked (same file system) to keep this fast; falls back to a real copy.
install_samplers() {
  local tmp="$SAMPLERS.new" stamp
  # Unchanged sources: keep the installed copy (replacing it under running tasks could break them).
  stamp=$(cd "$BC_ROOT" && cat package.json package-lock.json tsconfig.json cluster-fake/samplers/* lib/samplers/* 2>/dev/null | sha256sum | cut -c1-64)
  [ -f "$SAMPLERS/.stamp" ] && [ "$(cat "$SAMPLERS/.stamp")" = "$stamp" ] && return 0
  rm -rf "$tmp"; mkdir -p "$tmp/cluster-fake" "$tmp/lib" "$tmp/bin"
  cp "$BC_ROOT/package.json" "$BC_ROOT/tsconfig.json" "$tmp/"
  cp -r "$BC_ROOT/cluster-fake/samplers" "$tmp/cluster-fake/"
  cp -r "$BC_ROOT/lib/samplers" "$tmp/lib/"
  cp -al "$BC_ROOT/node_modules" "$tmp/node_modules" 2>/dev/null || { rm -rf "$tmp/node_modules"; cp -a "$BC_ROOT/node_modules" "$tmp/node_modules"; }
  cat > "$tmp/bin/ergodex-sampler" <<SH
#!/bin/sh
# Ergodex's built-in samplers: ergodex-sampler <name> <run.json> <outdir>. exec keeps the PID, so the
# scheduler's SIGTERM reaches the sampler itself (exit 3 with a checkpoint).
exec node --import "$SAMPLERS/node_modules/tsx/dist/loader.mjs" "$SAMPLERS/cluster-fake/samplers/cli.ts" "\$@"
SH
  chmod 755 "$tmp/bin/ergodex-sampler"
  echo "$stamp" > "$tmp/.stamp"
  chmod -R a+rX "$tmp"
  rm -rf "$SAMPLERS"; mv "$tmp" "$SAMPLERS"
}
install_samplers

# --- munged ---------------------------------------------------------------------------------
if ! bc_alive_pid "$BC_STATE/run/munged.pid" >/dev/null; then
  [ -s "$BC_STATE/munge/munge.key" ] || { dd if=/dev/urandom of="$BC_STATE/munge/munge.key" bs=1024 count=1 status=none; chmod 600 "$BC_STATE/munge/munge.key"; }
  rm -f "$MUNGE_SOCKET" "$MUNGE_SOCKET.lock"
  munged --force --socket="$MUNGE_SOCKET" --key-file="$BC_STATE/munge/munge.key" \
    --pid-file="$BC_STATE/run/munged.pid" --log-file="$BC_STATE/log/munged.log" --seed-file="$BC_STATE/munge/munged.seed"
fi
for _ in $(seq 50); do [ -S "$MUNGE_SOCKET" ] && break; sleep 0.1; done
[ -S "$MUNGE_SOCKET" ] || { bc_log "munged did not create $MUNGE_SOCKET; see $BC_STATE/log/munged.log"; exit 1; }
runuser -u "$BC_USER" -- sh -c "munge -n -S '$MUNGE_SOCKET' | unmunge -S '$MUNGE_SOCKET' >/dev/null" \
  || { bc_log "munge round trip as $BC_USER failed"; exit 1; }

# --- scheduler config -----------------------------------------------------------------------
hw=$(slurmd -C | head -1)
field() { sed -n "s/.*\b$1=\([0-9]*\).*/\1/p" <<<"$hw"; }
MEM=$(( $(field RealMemory) * 9 / 10 ))
sed -e "s|@CLUSTER@|$BC_CLUSTER|; s|@CTLD_PORT@|$BC_CTLD_PORT|; s|@SLURMD_PORT@|$BC_SLURMD_PORT|" \
    -e "s|@MUNGE_SOCKET@|$MUNGE_SOCKET|; s|@STATE@|$BC_STATE|g; s|@KILL_WAIT@|$BC_KILL_WAIT|; s|@PUB@|$PUB|g" \
    -e "s|@NODE@|$BC_NODE|g; s|@CPUS@|$(field CPUs)|; s|@SOCKETS@|$(field SocketsPerBoard)|" \
    -e "s|@CORES@|$(field CoresPerSocket)|; s|@THREADS@|$(field ThreadsPerCore)|; s|@MEM@|$MEM|; s|@PARTITION@|$BC_PARTITION|" \
    "$BC_HERE/templates/slurm.conf.tmpl" > "$SLURM_CONF.new"
chmod 644 "$SLURM_CONF.new"; mv "$SLURM_CONF.new" "$SLURM_CONF"

# --- slurmctld and slurmd -------------------------------------------------------------------
if ! bc_alive_pid "$BC_STATE/run/slurmctld.pid" >/dev/null; then
  slurmctld -f "$SLURM_CONF"
fi
# The node daemon is started with an explicit node name (the host name is not in the config), and
# only when the one from this state dir is gone: a second one would kill it through the pid file.
if ! bc_alive_pid "$BC_STATE/run/slurmd.pid" >/dev/null; then
  slurmd -f "$SLURM_CONF" -N "$BC_NODE"
fi

# --- sshd -----------------------------------------------------------------------------------
[ -s "$BC_STATE/ssh/ssh_host_ed25519_key" ] || ssh-keygen -q -t ed25519 -N '' -C "ergodex-batch-login" -f "$BC_STATE/ssh/ssh_host_ed25519_key"
[ -s "$BC_STATE/keys/client_ed25519" ] || ssh-keygen -q -t ed25519 -N '' -C "ergodex-broker" -f "$BC_STATE/keys/client_ed25519"
install -o "$BC_USER" -g "$(id -gn "$BC_USER")" -m 600 "$BC_STATE/keys/client_ed25519.pub" "$HOME_DIR/.ssh/authorized_keys"
sed -e "s|@SSH_PORT@|$BC_SSH_PORT|; s|@STATE@|$BC_STATE|g; s|@USER@|$BC_USER|; s|@SLURM_CONF@|$SLURM_CONF|" \
  "$BC_HERE/templates/sshd_config.tmpl" > "$BC_STATE/ssh/sshd_config"
mkdir -p /run/sshd; chmod 755 /run/sshd   # sshd's privilege-separation directory
/usr/sbin/sshd -t -f "$BC_STATE/ssh/sshd_config"
if ! bc_alive_pid "$BC_STATE/run/sshd.pid" >/dev/null; then
  /usr/sbin/sshd -f "$BC_STATE/ssh/sshd_config" -E "$BC_STATE/log/sshd.log"
fi

# --- wait until usable ----------------------------------------------------------------------
state=""
for _ in $(seq 120); do
  state=$(sinfo -h -n "$BC_NODE" -o %T 2>/dev/null | head -1 || true)
  [ "$state" = idle ] || [ "$state" = mixed ] || [ "$state" = allocated ] && break
  sleep 0.5
done
case "$state" in idle|mixed|allocated) ;; *)
  bc_log "node $BC_NODE is '${state:-not reported}', not idle; see $BC_STATE/log/slurmctld.log and slurmd.log"; exit 1;;
esac
ssh_ok=""
for _ in $(seq 60); do
  if ssh-keyscan -T 2 -p "$BC_SSH_PORT" 127.0.0.1 >/dev/null 2>&1; then ssh_ok=1; break; fi
  sleep 0.25
done
[ -n "$ssh_ok" ] || { bc_log "sshd does not accept connections on 127.0.0.1:$BC_SSH_PORT; see $BC_STATE/log/sshd.log"; exit 1; }

FP=$(ssh-keygen -l -f "$BC_STATE/ssh/ssh_host_ed25519_key.pub" | awk '{print $2}')
cat > "$BC_STATE/connection.json" <<JSON
{
  "host": "127.0.0.1",
  "port": $BC_SSH_PORT,
  "user": "$BC_USER",
  "privateKeyPath": "$BC_STATE/keys/client_ed25519",
  "publicKeyPath": "$BC_STATE/keys/client_ed25519.pub",
  "hostPublicKeyPath": "$BC_STATE/ssh/ssh_host_ed25519_key.pub",
  "hostKeyFingerprint": "$FP",
  "partition": "$BC_PARTITION",
  "nodeName": "$BC_NODE",
  "cpus": $(field CPUs),
  "workRoot": "$WORK_ROOT",
  "samplerCommand": "$SAMPLERS/bin/ergodex-sampler",
  "slurmConf": "$SLURM_CONF",
  "killWaitSeconds": $BC_KILL_WAIT
}
JSON
echo "batch-cluster ready 127.0.0.1:$BC_SSH_PORT $FP"
