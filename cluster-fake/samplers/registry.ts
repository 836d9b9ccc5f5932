/** Built-in sampler name -> core factory. */
import type { SamplerName } from "../../lib/samplers/schemas";
import type { CoreFactory } from "./core";
import { createIsing2d } from "./ising2d";
import { createLoggas } from "./loggas";
import { createOscillator } from "./oscillator";

/** The factory of every built-in sampler. */
export const CORE_FACTORIES: Record<SamplerName, CoreFactory> = {
  ising2d: createIsing2d,
  oscillator: createOscillator,
  loggas: createLoggas,
};
