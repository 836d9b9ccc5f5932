/** The choices the server offers the explorer's filters (only what the viewer may see). */
export type ExplorerOptions = {
  samplers: { name: string; observables: string[]; params: string[] }[];
  owners: { id: string; name: string }[];
  ensembles: { id: string; name: string; sampler: string }[];
};

/** Observables and parameters of the chosen sampler, or of all samplers. */
export function choicesFor(o: ExplorerOptions, sampler: string) {
  const list = sampler ? o.samplers.filter((s) => s.name === sampler) : o.samplers;
  const uniq = (xs: string[]) => [...new Set(xs)].sort();
  return { observables: uniq(list.flatMap((s) => s.observables)), params: uniq(list.flatMap((s) => s.params)) };
}

/** The sampler whose observables and parameters apply: the chosen one, else the chosen ensemble's. */
export function effectiveSampler(o: ExplorerOptions, sampler: string, ensemble: string) {
  return sampler || o.ensembles.find((e) => e.id === ensemble)?.sampler || "";
}

export const selectClass = "rounded-md border border-line-strong bg-paper-raised px-2 py-1 text-sm";
