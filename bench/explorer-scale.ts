// Explorer at scale: fills a SEPARATE database (default ergodex_bench) with an INVENTED archive —
// 100,000 runs, 1,000,000 estimates, 100,000,000 stored series values — generated server-side, then
// prints p50/p95 of typical explorer queries (queryEstimates, plotSeries in-process) and EXPLAIN
// ANALYZE of the slowest. Not part of the test suite.
//   node --conditions=react-server --import tsx bench/explorer-scale.ts [--keep] [--reuse] [--db name] [--reps 25]
// --keep leaves the database for another look; --reuse measures an existing filled database.
import { execFileSync } from "node:child_process";
import pg from "pg";
import { QueryTypes } from "sequelize";
import { databaseUrl, env } from "../lib/env";
import { createSequelize, setSequelize } from "../lib/db/sequelize";
import { initModels } from "../models";
import type { Identity } from "../lib/auth/identity";
import { allIdsSql, buildEstimateQuery, pageParts } from "../lib/explorer/build-query";
import { parseExplorerQuery } from "../lib/explorer/query";
import { COUNT_CAP, queryEstimates } from "../lib/explorer/query-estimates";
import { PLOT_LIMIT, plotSeries } from "../lib/explorer/plot-series";

const arg = (name: string) => { const i = process.argv.indexOf(name); return i >= 0 ? process.argv[i + 1] : undefined; };
const DB = arg("--db") ?? "ergodex_bench";
const KEEP = process.argv.includes("--keep");
const REUSE = process.argv.includes("--reuse");
const REPS = Number(arg("--reps") ?? 25);
if (DB === env.pg.database || DB === env.testTemplateDb || !/^[a-z_][a-z0-9_]*$/.test(DB)) throw new Error(`refusing to use database ${DB}: name a separate bench database`);

const ENSEMBLES = 200, POINTS_PER = 125, REPLICAS = 4, OBSERVABLES = 8, VALUES_PER_RUN = 1000;

async function admin(sql: string) {
  const c = new pg.Client({ connectionString: databaseUrl("postgres") });
  await c.connect();
  try { await c.query(sql); } finally { await c.end(); }
}

/** Invented data: every row is synthetic; names say "bench" so nobody mistakes them for results. */
const FILL = [
  `INSERT INTO groups (slug, name) SELECT 'bench-' || g, 'Bench group ' || g FROM generate_series(1, 4) g`,
  `INSERT INTO users (email, name, role) SELECT 'bench' || g || '@bench.invalid', 'Bench person ' || g, 'researcher' FROM generate_series(1, 4) g`,
  `INSERT INTO memberships (user_id, group_id) SELECT u.id, g.id FROM users u JOIN groups g ON substr(u.email, 6, 1) = substr(g.slug, 7, 1)`,
  `INSERT INTO samplers (name, version, command, params_schema) VALUES ('ising2d', 'bench', 'none',
     '{"type":"object","properties":{"L":{"type":"integer"},"T":{"type":"number"},"algorithm":{"type":"string"}}}')`,
  `INSERT INTO ensembles (name, owner_id, group_id, sampler_id, spec, spec_hash, master_seed, tags, created_at)
     SELECT 'bench ensemble ' || i, u.id, m.group_id, (SELECT id FROM samplers), '{}'::jsonb, repeat('0', 64), '1',
            ARRAY['bench', CASE WHEN i % 2 = 0 THEN 'even' ELSE 'odd' END], now() - i * interval '1 hour'
       FROM generate_series(1, ${ENSEMBLES}) i JOIN users u ON u.email = 'bench' || (1 + i % 4) || '@bench.invalid' JOIN memberships m ON m.user_id = u.id`,
  // 125 points per ensemble: L in 8..40 step 8 × 25 temperatures in [1.5, 3.5]
  `INSERT INTO parameter_points (ensemble_id, point_index, params)
     SELECT e.id, k, jsonb_build_object('L', 8 * (1 + k / 25), 'T', round((1.5 + (k % 25) * 2.0 / 24)::numeric, 4),
            'algorithm', CASE WHEN k % 2 = 0 THEN 'metropolis' ELSE 'wolff' END)
       FROM ensembles e CROSS JOIN generate_series(0, ${POINTS_PER - 1}) k`,
  `INSERT INTO runs (ensemble_id, point_id, replica, seed, state)
     SELECT p.ensemble_id, p.id, r, (abs(hashtext(p.id::text || r)))::text, 'done' FROM parameter_points p CROSS JOIN generate_series(0, ${REPLICAS - 1}) r`,
  `INSERT INTO estimates (scope, run_id, point_id, ensemble_id, observable, mean, error, tau_int, n, method, analysis_version, params)
     SELECT 'run', r.id, r.point_id, r.ensemble_id, 'obs' || o, -(p.params->>'T')::float8 * o + random() * 0.01, 0.01 + random() * 0.001,
            1 + random() * 5, 9000, 'gamma-wolff', 'bench', p.params
       FROM runs r JOIN parameter_points p ON p.id = r.point_id CROSS JOIN generate_series(1, ${OBSERVABLES}) o`,
  `INSERT INTO estimates (scope, point_id, ensemble_id, observable, mean, error, tau_int, n, method, analysis_version, params)
     SELECT 'point', p.id, p.ensemble_id, 'obs' || o, -(p.params->>'T')::float8 * o, 0.005, 1 + random() * 5, 36000, 'inverse-variance', 'bench', p.params
       FROM parameter_points p CROSS JOIN generate_series(1, ${OBSERVABLES}) o`,
  // 100,000 runs × 1000 values of one observable, one chunk each
  `INSERT INTO series (run_id, observable, chunk_index, start_row, "values")
     SELECT r.id, 'obs1', 0, 0, (SELECT array_agg(random()) FROM generate_series(1, ${VALUES_PER_RUN}) WHERE r.id IS NOT NULL) FROM runs r`,
  // What autovacuum does to tables this size soon after a bulk load; index-only scans need the visibility map.
  `VACUUM (ANALYZE) estimates, explorer.estimate_rows, explorer.param_values`,
  `ANALYZE`,
];

const pct = (xs: number[], p: number) => { const s = [...xs].sort((a, b) => a - b); return s[Math.min(s.length - 1, Math.floor(p * s.length))]; };

async function main() {
  if (!REUSE) {
    await admin(`DROP DATABASE IF EXISTS ${DB} WITH (FORCE)`);
    await admin(`CREATE DATABASE ${DB}`);
    execFileSync(process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/migrate.ts", "up", "--db", DB], { stdio: "inherit", cwd: env.root });
  }
  const sequelize = createSequelize(databaseUrl(DB), { poolMax: 4 });
  initModels(sequelize);
  setSequelize(sequelize);
  try {
    if (!REUSE) {
      for (const sql of FILL) {
        const t = Date.now();
        await sequelize.query(sql);
        console.log(`fill ${(Date.now() - t) / 1000}s  ${sql.trim().split("\n")[0].slice(0, 90)}`);
      }
    }
    const [counts] = await sequelize.query<Record<string, string>>(`SELECT (SELECT count(*) FROM runs) AS runs, (SELECT count(*) FROM estimates) AS estimates,
      (SELECT sum(cardinality("values")) FROM series) AS "values", pg_size_pretty(pg_database_size(current_database())) AS size`, { type: QueryTypes.SELECT });
    console.log("archive (invented data):", counts);
    const [u] = await sequelize.query<{ id: string; group_id: string }>(`SELECT u.id, m.group_id FROM users u JOIN memberships m ON m.user_id = u.id LIMIT 1`, { type: QueryTypes.SELECT });
    const coordinator: Identity = { userId: u.id, email: "c@bench.invalid", name: "bench coordinator", role: "coordinator", groupIds: [], leadGroupIds: [], via: "session" };
    const researcher: Identity = { ...coordinator, name: "bench researcher", role: "researcher", groupIds: [u.group_id] };
    const [ens] = await sequelize.query<{ id: string }>(`SELECT id FROM ensembles ORDER BY created_at LIMIT 1`, { type: QueryTypes.SELECT });
    const table: [string, Identity, Record<string, string>][] = [
      ["table: default page (all point estimates, newest)", coordinator, {}],
      ["table: observable + T range, sort mean", researcher, { observable: "obs3", "p.T": "2.0..2.5", sort: "mean", dir: "asc" }],
      ["table: run scope, L = 16, sort param:T, page 40", coordinator, { scope: "run", "p.L": "16", sort: "param:T", dir: "desc", page: "40" }],
      ["table: tag + algorithm + tauInt sort", researcher, { tag: "even", "p.algorithm": "wolff", sort: "tauInt", dir: "desc" }],
      ["table: one ensemble, run scope", coordinator, { ensemble: ens.id, scope: "run", sort: "observable", dir: "asc" }],
    ];
    const plots: [string, Identity, Record<string, string>, string, string][] = [
      ["plot: obs1 vs T by L, one ensemble", coordinator, { observable: "obs1", ensemble: ens.id }, "T", "param:L"],
      ["plot: obs2 vs T by ensemble, L = 24, group scope", researcher, { observable: "obs2", "p.L": "24" }, "T", "ensemble"],
    ];
    const results: { name: string; kind: "table" | "plot"; p50: number; p95: number; sp: Record<string, string>; who: Identity; x?: string }[] = [];
    for (const [name, who, sp] of table) {
      const q = parseExplorerQuery(new URLSearchParams(sp));
      await queryEstimates(who, q); // warm
      const ms: number[] = [];
      for (let i = 0; i < REPS; i++) { const t = performance.now(); await queryEstimates(who, q); ms.push(performance.now() - t); }
      results.push({ name, kind: "table", p50: pct(ms, 0.5), p95: pct(ms, 0.95), sp, who });
    }
    for (const [name, who, sp, x, groupBy] of plots) {
      const q = { ...parseExplorerQuery(new URLSearchParams(sp)), x, groupBy: groupBy as "ensemble" };
      const first = await plotSeries(who, q);
      const ms: number[] = [];
      for (let i = 0; i < REPS; i++) { const t = performance.now(); await plotSeries(who, q); ms.push(performance.now() - t); }
      results.push({ name: `${name} (${first.series.length} lines, ${first.rows.length} points)`, kind: "plot", p50: pct(ms, 0.5), p95: pct(ms, 0.95), sp, who, x });
    }
    console.log(`\n${"query".padEnd(78)} p50 ms   p95 ms  (n=${REPS}; targets p95 < 150 table, < 300 plot)`);
    for (const r of results) console.log(`${r.name.padEnd(78)} ${r.p50.toFixed(1).padStart(7)}  ${r.p95.toFixed(1).padStart(7)}`);
    const slowest = [...results].sort((a, b) => b.p95 / (b.kind === "plot" ? 300 : 150) - a.p95 / (a.kind === "plot" ? 300 : 150))[0];
    const sq = parseExplorerQuery(new URLSearchParams(slowest.sp));
    // A plot reads every match in its x order (allEstimates → allIds); a table one page.
    const b = await buildEstimateQuery(slowest.who, slowest.kind === "plot" ? { ...sq, sort: { column: `param:${slowest.x}`, dir: "asc" } } : sq);
    const head = (slowest.kind === "plot" ? allIdsSql(b, PLOT_LIMIT + 1) : null) ?? pageParts(b).head((sq.page - 1) * sq.pageSize, sq.pageSize);
    const plan = await sequelize.query<{ "QUERY PLAN": string }>(`EXPLAIN (ANALYZE, BUFFERS) ${head.sql}`, { type: QueryTypes.SELECT, bind: head.bind });
    console.log(`\nEXPLAIN (ANALYZE, BUFFERS) of the slowest relative to its target: ${slowest.name}\n${plan.map((r) => r["QUERY PLAN"]).join("\n")}`);
    const countPlan = await sequelize.query<{ "QUERY PLAN": string }>(`EXPLAIN (ANALYZE, BUFFERS) SELECT count(*) FROM (SELECT 1 FROM explorer.estimate_rows x WHERE ${b.where} LIMIT ${COUNT_CAP + 1}) c`, { type: QueryTypes.SELECT, bind: b.whereBind });
    console.log(`\n(its exact count: the app runs it only when the planner expects at most ${(5 * COUNT_CAP).toLocaleString("en-GB")} matches, else shows "about N")\n${countPlan.map((r) => r["QUERY PLAN"]).join("\n")}`);
  } finally {
    await sequelize.close();
    if (!KEEP) { await admin(`DROP DATABASE IF EXISTS ${DB} WITH (FORCE)`); console.log(`\ndropped ${DB} (pass --keep to keep it)`); }
  }
}

await main();
