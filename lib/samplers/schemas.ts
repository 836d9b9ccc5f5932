/**
 * Parameter JSON Schemas (2020-12) and catalogue of the built-in samplers.
 * The app validates ensemble specs with these same schemas; the cluster-side
 * samplers validate run.json with them, so the two can never disagree.
 */

/** Names of the built-in samplers. */
export const SAMPLER_NAMES = ["ising2d", "oscillator", "loggas"] as const;
export type SamplerName = (typeof SAMPLER_NAMES)[number];

/** Version of each built-in sampler; bump on any change that alters its output. */
export const SAMPLER_VERSIONS: Record<SamplerName, string> = {
  ising2d: "1.0.0",
  oscillator: "1.0.0",
  loggas: "1.0.0",
};

export interface Ising2dParams {
  L: number;
  T: number;
  algorithm: "metropolis" | "wolff";
  /** Metropolis visiting order; ignored by nothing, rejected with wolff. */
  sweep?: "sequential" | "checkerboard";
  /** Start configuration: all +1 ("cold") or independent random spins ("hot"). */
  start?: "cold" | "hot";
  /** Wolff clusters per measurement sweep; default L²/⟨cluster size⟩ from the thermalization. */
  clusters?: number;
}

export interface OscillatorParams {
  N: number;
  a: number;
  m: number;
  omega: number;
  step: number;
  hits?: number;
}

export interface LoggasParams {
  N: number;
  beta: number;
  method: "metropolis" | "tridiagonal";
  /** Metropolis proposal half-width; default from the bulk level spacing. */
  step?: number;
}

const positive = (maximum: number, description: string) => ({
  type: "number",
  exclusiveMinimum: 0,
  maximum,
  description,
});

/** ising2d: square-lattice Ising model, periodic L×L, J=1, k_B=1. */
export const ising2dParamsSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/samplers/ising2d/params.json",
  title: "ising2d parameters",
  type: "object",
  properties: {
    L: { type: "integer", minimum: 2, maximum: 4096, description: "linear lattice size (L×L sites, periodic)" },
    T: positive(10000, "temperature in units of J/k_B (T_c = 2/ln(1+√2) ≈ 2.269)"),
    algorithm: { enum: ["metropolis", "wolff"], description: "single-spin Metropolis or Wolff (1989) cluster update" },
    sweep: {
      enum: ["sequential", "checkerboard"],
      default: "sequential",
      description: "Metropolis visiting order: row by row, or all even then all odd sites",
    },
    start: { enum: ["cold", "hot"], default: "cold", description: "start configuration: all +1, or random spins" },
    clusters: {
      type: "integer",
      minimum: 1,
      maximum: 1e9,
      description: "Wolff clusters per measurement sweep (default: L²/mean cluster size measured during thermalization)",
    },
  },
  required: ["L", "T", "algorithm"],
  additionalProperties: false,
  if: { properties: { algorithm: { const: "wolff" } }, required: ["algorithm"] },
  then: { properties: { sweep: false } },
  else: { properties: { clusters: false } },
} as const;

/** oscillator: Euclidean lattice path integral of the harmonic oscillator (Creutz & Freedman 1981). */
export const oscillatorParamsSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/samplers/oscillator/params.json",
  title: "oscillator parameters",
  type: "object",
  properties: {
    N: { type: "integer", minimum: 2, maximum: 1_000_000, description: "number of time slices (periodic)" },
    a: positive(100, "lattice spacing in Euclidean time"),
    m: positive(1e6, "mass"),
    omega: positive(1e6, "angular frequency"),
    step: positive(1e6, "Metropolis proposal half-width: x' = x + step·(2u−1)"),
    hits: { type: "integer", minimum: 1, maximum: 1000, default: 1, description: "Metropolis hits per site per sweep" },
  },
  required: ["N", "a", "m", "omega", "step"],
  additionalProperties: false,
} as const;

/** loggas: Gaussian β-ensemble, density ∝ Π|λi−λj|^β exp(−Σλ²/2). */
export const loggasParamsSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/samplers/loggas/params.json",
  title: "loggas parameters",
  type: "object",
  properties: {
    N: { type: "integer", minimum: 1, maximum: 4096, description: "number of eigenvalues" },
    beta: positive(1000, "Dyson index β (1, 2, 4 are GOE, GUE, GSE; any β > 0 allowed)"),
    method: {
      enum: ["metropolis", "tridiagonal"],
      description: "single-eigenvalue Metropolis, or exact independent samples (Dumitriu & Edelman 2002)",
    },
    step: positive(1e6, "Metropolis proposal half-width; default π·sqrt(2βN+1)/(2N), about one bulk level spacing"),
  },
  required: ["N", "beta", "method"],
  additionalProperties: false,
  if: { properties: { method: { const: "tridiagonal" } }, required: ["method"] },
  then: { properties: { step: false } },
} as const;

/** Description of one observable (one series column). */
export interface ObservableInfo {
  name: string;
  description: string;
}

/** What the app needs to register a built-in sampler. */
export interface SamplerInfo {
  name: SamplerName;
  version: string;
  description: string;
  paramsSchema: object;
  observables: readonly ObservableInfo[];
  /** What one "sweep" (the unit of thermalization and interval) means for this sampler. */
  sweepUnit: string;
  /** Extra files (besides the series) in the result bundle. */
  extraFiles: readonly string[];
}

/** Catalogue of the built-in samplers, keyed by name. */
export const SAMPLER_CATALOG: Record<SamplerName, SamplerInfo> = {
  ising2d: {
    name: "ising2d",
    version: SAMPLER_VERSIONS.ising2d,
    description: "Square-lattice Ising model, periodic L×L, J=1",
    paramsSchema: ising2dParamsSchema,
    observables: [
      { name: "e", description: "energy per site, −(1/L²)Σ⟨ij⟩ s_i s_j" },
      { name: "absM", description: "|m|, absolute magnetisation per site" },
      { name: "m2", description: "m², square of the magnetisation per site" },
      { name: "m4", description: "m⁴, fourth power of the magnetisation per site" },
    ],
    sweepUnit:
      "metropolis: L² single-spin attempts; wolff: while thermalizing, clusters until ≥ L² spins flipped; " +
      "when measuring, a fixed number of clusters (params.clusters, default L²/mean cluster size)",
    extraFiles: [],
  },
  oscillator: {
    name: "oscillator",
    version: SAMPLER_VERSIONS.oscillator,
    description: "Euclidean path integral of the harmonic oscillator on a periodic time lattice, Metropolis",
    paramsSchema: oscillatorParamsSchema,
    observables: [
      { name: "x2", description: "(1/N)Σ x_i², mean x² of the configuration" },
      { name: "action", description: "lattice action per site, S/N" },
      { name: "acceptance", description: "Metropolis acceptance rate over the sweeps since the previous measurement" },
    ],
    sweepUnit: "one pass over the N sites with `hits` Metropolis hits each",
    extraFiles: [],
  },
  loggas: {
    name: "loggas",
    version: SAMPLER_VERSIONS.loggas,
    description: "Gaussian β-ensemble of N eigenvalues (log-gas)",
    paramsSchema: loggasParamsSchema,
    observables: [
      { name: "sumSq", description: "Σλ²/N" },
      { name: "lambdaMax", description: "largest eigenvalue" },
    ],
    sweepUnit: "metropolis: N single-eigenvalue moves; tridiagonal: one new independent sample",
    extraFiles: ["spectrum.csv"],
  },
};

/** Schema of the run input file written by the broker (DESIGN.md "run.json"). */
export const runInputSchema = {
  $schema: "https://json-schema.org/draft/2020-12/schema",
  $id: "https://ergodex.invalid/run.json",
  title: "Ergodex run input",
  type: "object",
  properties: {
    format: { const: "ergodex.run/1" },
    runId: { type: "string", minLength: 1, maxLength: 200 },
    sampler: {
      type: "object",
      properties: { name: { type: "string" }, version: { type: "string" } },
      required: ["name", "version"],
    },
    params: { type: "object" },
    seed: { type: "string", pattern: "^(0|[1-9][0-9]{0,19})$" },
    thermalization: { type: "integer", minimum: 0, maximum: 1e9 },
    measurements: { type: "integer", minimum: 1, maximum: 1e9 },
    interval: { type: "integer", minimum: 1, maximum: 1e6 },
    encoding: { enum: ["csv", "f64le"], default: "csv", description: "series file encoding (optional)" },
  },
  // Other top-level keys are allowed so the broker can add fields without breaking older samplers.
  required: ["format", "runId", "sampler", "params", "seed", "thermalization", "measurements", "interval"],
} as const;
