#!/usr/bin/env node
// ergodex: the command-line client of the Ergodex API. Plain Node 20 ESM with the built-in fetch and
// no dependencies, so it runs from the package without a build step. Configuration comes from the
// environment only: ERGODEX_TOKEN (an API token, made on the Account page) and ERGODEX_URL.
import fs from "node:fs";
import path from "node:path";

const HELP = `ergodex – submit and follow Monte Carlo ensembles on Ergodex

usage:
  ergodex send <spec.json|spec.yaml> [--preview] [--json]
      submit an ensemble spec (with --preview: show points, runs, seeds and core-hours, submit nothing)
  ergodex look <ensembleId> [--json]
      show an ensemble: state, runs per state, progress, core-hours, the points × replicas grid
  ergodex halt <ensembleId> [--json]
      cancel the ensemble's queued, dispatched and running runs
  ergodex retry <ensembleId> [--json]
      queue the ensemble's failed runs again (a new reservation is made)
  ergodex fetch-estimates <ensembleId> [-o file.csv] [--runs] [--json]
      download the current estimates per point (--runs: per run) as CSV (--json: JSON)
  ergodex deposit <bundle-folder|bundles.zip|bundles.tar.gz> [--group=<slug>] [--json]
      upload result bundles of runs done elsewhere; prints accepted / already imported / refused (and why) per bundle

environment:
  ERGODEX_TOKEN   API token (required), e.g. edx_…
  ERGODEX_URL     server address (default http://127.0.0.1:3417)

The spec format and its JSON Schema: docs/ensemble-spec.md and GET /api/v1/schemas/ensemble-spec.
Exit status: 0 ok, 1 refused by the server, 2 bad usage, 3 server unreachable.`;

class CliError extends Error {
  constructor(message, exitCode = 1) { super(message); this.exitCode = exitCode; }
}

function parseArgs(argv) {
  const flags = new Set();
  const positional = [];
  let out = null;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "-o" || a === "--output") {
      out = argv[++i];
      if (!out) throw new CliError(`${a} needs a file name`, 2);
    } else if (a.startsWith("--")) flags.add(a.slice(2));
    else if (a === "-h") flags.add("help");
    else positional.push(a);
  }
  return { command: positional[0], args: positional.slice(1), flags, out };
}

function config() {
  const token = process.env.ERGODEX_TOKEN;
  if (!token) throw new CliError("ERGODEX_TOKEN is not set: create an API token on your Account page and export it", 2);
  const url = (process.env.ERGODEX_URL || "http://127.0.0.1:3417").replace(/\/+$/, "");
  try { new URL(url); } catch { throw new CliError(`ERGODEX_URL is not a URL: ${url}`, 2); }
  return { token, url };
}

/** The server's JSON error as readable lines: its message, then one line per field issue. */
function describeError(status, body, text) {
  const e = body && body.error;
  if (!e) return `server answered ${status}: ${text.slice(0, 300) || "(no body)"}`;
  const lines = [`${e.message} (${e.code}, HTTP ${status})`];
  for (const i of e.issues ?? []) lines.push(`  ${i.path}: ${i.message}`);
  if (e.needed !== undefined && e.available !== undefined && !/needs/.test(e.message)) lines.push(`  needed ${e.needed} core-hours, available ${e.available}`);
  // admission refusals (#8): which limit bit; the message already says whom to ask
  if (e.limit) lines.push(`  refused by: ${String(e.limit).replace(/_/g, " ")} (needed ${e.needed} core-hours, free ${e.free ?? e.available})`);
  return lines.join("\n");
}

async function call(method, route, { body, contentType, accept, headers: extra } = {}) {
  const { token, url } = config();
  const headers = { authorization: `Bearer ${token}`, accept: accept ?? "application/json", ...extra };
  if (body !== undefined && contentType !== null) headers["content-type"] = contentType ?? "application/json";
  let res;
  try {
    // A file stream as body needs duplex "half" (Node's fetch streams it instead of buffering).
    res = await fetch(url + route, { method, headers, body, duplex: "half" });
  } catch (err) {
    throw new CliError(`cannot reach ${url} (${err.cause?.code ?? err.message}); is Ergodex running? (npm start)`, 3);
  }
  const text = await res.text();
  let json = null;
  try { json = JSON.parse(text); } catch { /* CSV or an HTML error page */ }
  if (!res.ok) throw new CliError(describeError(res.status, json, text));
  return { json, text };
}

const idArg = (args, what = "ensemble id") => {
  if (!args[0]) throw new CliError(`missing ${what}; see ergodex --help`, 2);
  return encodeURIComponent(args[0]);
};
const hours = (x) => Number(x).toLocaleString("en", { maximumFractionDigits: 2 });
const print = (s) => process.stdout.write(s + "\n");

async function send(args, flags) {
  if (!args[0]) throw new CliError("missing spec file; usage: ergodex send <spec.json|spec.yaml>", 2);
  let text;
  try { text = fs.readFileSync(args[0], "utf8"); } catch (err) { throw new CliError(`cannot read ${args[0]}: ${err.code ?? err.message}`, 2); }
  const yaml = /\.ya?ml$/i.test(args[0]);
  const route = flags.has("preview") ? "/api/v1/ensembles/preview" : "/api/v1/ensembles";
  const { json } = await call("POST", route, { body: text, contentType: yaml ? "application/yaml" : "application/json" });
  if (flags.has("json")) return print(JSON.stringify(json.data, null, 2));
  const d = json.data;
  if (flags.has("preview")) {
    print(`${d.points} points × ${d.replicas} replicas = ${d.runs} runs, ${hours(d.coreHoursNeeded)} core-hours (${hours(d.coreHoursPerRun)} per run)`);
    if (d.allocation) print(`allocation "${d.allocation.name}": ${hours(d.allocation.available)} core-hours available`);
    if (d.cap) print(`your per-person cap: ${hours(d.cap.remaining)} of ${hours(d.cap.limit)} left`);
    for (const s of d.seeds) print(`  point ${s.pointIndex} replica ${s.replica}  seed ${s.seed}  ${JSON.stringify(s.params)}`);
    if (d.runs > d.seeds.length) print(`  … and ${d.runs - d.seeds.length} more runs`);
    for (const p of d.problems) print(`problem${p.path ? ` at ${p.path}` : ""}: ${p.message}`);
    if (!d.ok) throw new CliError("the spec would be refused as it stands");
    return print("ok: submit with ergodex send " + args[0]);
  }
  print(`submitted ensemble ${d.ensembleId}: ${d.runIds.length} runs at ${d.points} points, ${hours(d.reservedCoreHours)} core-hours reserved`);
  print(`follow it with: ergodex look ${d.ensembleId}`);
}

const STATES = ["queued", "dispatched", "running", "collecting", "done", "failed", "cancelled"];
const LETTER = { queued: "q", dispatched: "d", running: "r", collecting: "c", done: "D", failed: "F", cancelled: "x" };

async function look(args, flags) {
  const { json } = await call("GET", `/api/v1/ensembles/${idArg(args)}`);
  const d = json.data;
  if (flags.has("json")) return print(JSON.stringify(d, null, 2));
  print(`${d.name}  [${d.state}]  ${d.id}`);
  print(`sampler ${d.sampler?.name} ${d.sampler?.version} · owner ${d.owner?.name ?? "?"} · ${d.points.length} points × ${d.replicas} replicas · ${(d.progress * 100).toFixed(1)} % done`);
  print("runs: " + STATES.filter((s) => d.counts[s] > 0).map((s) => `${d.counts[s]} ${s}`).join(", "));
  const c = d.coreHours;
  print(`core-hours: reserved ${hours(c.reserved)}, charged ${hours(c.charged)}, released ${hours(c.released)}, held ${hours(c.held)}`);
  if (d.points.length <= 50) {
    print(`grid (${Object.entries(LETTER).map(([s, l]) => `${l}=${s}`).join(" ")}):`);
    for (const p of d.points) {
      const cells = p.runs.map((r) => LETTER[r.state] ?? "?").join("");
      const running = p.runs.filter((r) => r.state === "running").map((r) => `${Math.round(r.progress * 100)}%`).join(" ");
      print(`  ${String(p.index).padStart(3)}  ${cells.padEnd(d.replicas)}  ${JSON.stringify(p.params)}${running ? "  " + running : ""}`);
    }
  }
}

async function halt(args, flags) {
  const { json } = await call("POST", `/api/v1/ensembles/${idArg(args)}/cancel`);
  const d = json.data;
  if (flags.has("json")) return print(JSON.stringify(d, null, 2));
  print(`cancelled ${d.cancelled} queued runs (${hours(d.releasedCoreHours)} core-hours released)` +
    (d.onCluster ? `; ${d.onCluster} runs on the cluster are being stopped` : ""));
}

async function retry(args, flags) {
  const { json } = await call("POST", `/api/v1/ensembles/${idArg(args)}/resubmit`);
  const d = json.data;
  if (flags.has("json")) return print(JSON.stringify(d, null, 2));
  print(`queued ${d.runIds.length} failed runs again, ${hours(d.reservedCoreHours)} core-hours reserved`);
}

async function fetchEstimates(args, flags, out) {
  const scope = flags.has("runs") ? "run" : "point";
  const format = flags.has("json") ? "json" : "csv";
  const { text, json } = await call("GET", `/api/v1/ensembles/${idArg(args)}/estimates?scope=${scope}&format=${format}`,
    { accept: format === "csv" ? "text/csv" : "application/json" });
  const body = format === "json" ? JSON.stringify(json.data, null, 2) + "\n" : text;
  if (!out) return process.stdout.write(body);
  fs.mkdirSync(path.dirname(path.resolve(out)), { recursive: true });
  fs.writeFileSync(out, body);
  const rows = format === "json" ? json.data.length : Math.max(0, body.trimEnd().split(/\r?\n/).length - 1);
  process.stderr.write(`wrote ${rows} estimates to ${out}\n`);
}

/** Every file under `dir` as paths relative to it. */
function walk(dir, rel = "") {
  const out = [];
  for (const e of fs.readdirSync(path.join(dir, rel), { withFileTypes: true })) {
    const r = rel ? `${rel}/${e.name}` : e.name;
    if (e.isDirectory()) out.push(...walk(dir, r));
    else if (e.isFile()) out.push(r);
    else throw new CliError(`${path.join(dir, r)} is not a plain file (links are not uploaded)`, 2);
  }
  return out;
}

async function deposit(args, flags) {
  const target = args[0];
  if (!target) throw new CliError("missing a bundle folder, .zip or .tar.gz; see ergodex --help", 2);
  if (!fs.existsSync(target)) throw new CliError(`${target} does not exist`, 2);
  const group = [...flags].find((f) => f.startsWith("group="))?.slice(6);
  const route = `/api/v1/imports${group ? `?group=${encodeURIComponent(group)}` : ""}`;
  let answer;
  if (fs.statSync(target).isDirectory()) {
    const form = new FormData();
    const base = path.basename(path.resolve(target));
    for (const rel of walk(target)) form.append("file", await fs.openAsBlob(path.join(target, rel)), `${base}/${rel}`);
    answer = await call("POST", route, { body: form, contentType: null });
  } else {
    const name = path.basename(target);
    const type = /\.zip$/i.test(name) ? "application/zip" : /\.(tar\.gz|tgz)$/i.test(name) ? "application/gzip" : "application/octet-stream";
    answer = await call("POST", route, { body: fs.createReadStream(target), contentType: type, headers: { "x-file-name": name, "content-length": String(fs.statSync(target).size) } });
  }
  const data = answer.json.data;
  if (flags.has("json")) print(JSON.stringify(data, null, 2));
  else {
    for (const b of data.bundles) {
      if (b.status === "accepted") print(`accepted          ${b.bundle}  run ${b.runId} (${b.rows} rows: ${b.observables.join(", ")})`);
      else if (b.status === "already-imported") print(`already imported  ${b.bundle}  run ${b.runId ?? "(deleted)"} (import ${b.importId})`);
      else print(`refused           ${b.bundle}\n    ${b.reason}`);
    }
    print(`${data.accepted} accepted, ${data.alreadyImported} already imported, ${data.refused} refused`);
  }
  if (data.refused > 0) process.exitCode = 1;
}

const COMMANDS = { send, look, halt, retry, "fetch-estimates": fetchEstimates, deposit };

async function main() {
  const { command, args, flags, out } = parseArgs(process.argv.slice(2));
  if (!command || flags.has("help") || command === "help") { print(HELP); return; }
  const run = COMMANDS[command];
  if (!run) throw new CliError(`unknown command "${command}" (commands: ${Object.keys(COMMANDS).join(", ")}); see ergodex --help`, 2);
  await run(args, flags, out);
}

main().catch((err) => {
  process.stderr.write(`ergodex: ${err instanceof CliError ? err.message : err.stack ?? err}\n`);
  process.exit(err instanceof CliError ? err.exitCode : 1);
});
