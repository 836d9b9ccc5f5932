// Server-action definitions of the Ensembles area (the "use server" files in app/(app)/ensembles/actions call these).
// The spec (object, or JSON/YAML text) is parsed here by parseSpec, which locates every problem by JSON path.
import { defineAction } from "../auth/action";
import { RESEARCHERS } from "../auth/roles";
import { parseSpec } from "../spec";
import { previewSubmission } from "../ensembles/preview-submission";
import { submitEnsemble } from "../ensembles/submit-ensemble";
import { cancelEnsemble } from "../ensembles/cancel-ensemble";
import { resubmitFailed } from "../ensembles/resubmit-failed";
import { ensembleTarget } from "../ensembles/ensemble-target";

// A spec as parsed data or as the text of a JSON/YAML file (1 MB is far more than any real spec).
const specInput = {
  type: "object", additionalProperties: false, required: ["spec"],
  properties: { spec: { anyOf: [{ type: "object" }, { type: "string", maxLength: 1_000_000 }] } },
} as const;
const idInput = { type: "object", additionalProperties: false, required: ["id"], properties: { id: { type: "string", format: "uuid" } } } as const;

export const previewEnsembleAction = defineAction({
  name: "ensembles.preview",
  schema: specInput,
  policy: { roles: RESEARCHERS },
  run: (i: { spec: unknown }, { who }) => previewSubmission(who, parseSpec(i.spec)),
});

export const submitEnsembleAction = defineAction({
  name: "ensembles.submit",
  schema: specInput,
  policy: { roles: RESEARCHERS },
  run: (i: { spec: unknown }, { who, audit }) => submitEnsemble(audit, who, parseSpec(i.spec)),
});

export const cancelEnsembleAction = defineAction({
  name: "ensembles.cancel",
  schema: idInput,
  policy: { roles: RESEARCHERS, target: (i: { id: string }) => ensembleTarget(i.id), access: "act" },
  run: (i: { id: string }, { who, audit }) => cancelEnsemble(audit, who, i.id),
});

export const resubmitFailedAction = defineAction({
  name: "ensembles.resubmitFailed",
  schema: idInput,
  policy: { roles: RESEARCHERS, target: (i: { id: string }) => ensembleTarget(i.id), access: "act" },
  run: (i: { id: string }, { who, audit }) => resubmitFailed(audit, who, i.id),
});
