// The link from an ensemble to the prediction it followed: a spec tag "plan:<prediction id>".
// A tag travels with the spec through the form, spec files, the API and the CLI, and is shown with
// the ensemble, so the link needs no change to the spec format and is visible to its owner.

const PREFIX = "plan:";
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** The tag that links an ensemble to prediction `id`. */
export function planTag(id: string): string {
  return `${PREFIX}${id}`;
}

/** Prediction ids named by an ensemble's tags (malformed ones ignored). */
export function planIdsOf(tags: readonly string[] | null | undefined): string[] {
  return (tags ?? []).filter((t) => t.startsWith(PREFIX) && UUID.test(t.slice(PREFIX.length))).map((t) => t.slice(PREFIX.length).toLowerCase());
}

/** `tags` with every plan tag replaced by the one for `id`. */
export function withPlanTag(tags: readonly string[], id: string): string[] {
  return [...tags.filter((t) => !t.startsWith(PREFIX)), planTag(id)];
}
