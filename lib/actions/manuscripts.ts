// Server-action definitions of the manuscripts pages (the "use server" files in app/(app)/manuscripts/actions call these).
import { defineAction } from "../auth/action";
import { PIS, RESEARCHERS } from "../auth/roles";
import { addCollaborator, addExhibit, createManuscript } from "../manuscripts/edit-manuscript";
import { manuscriptTarget } from "../manuscripts/access";
import { exhibitBodySchema, exhibitFromBody, type ExhibitBody } from "../manuscripts/exhibit-from-view";
import { freezeManuscript, unfreezeManuscript } from "../manuscripts/freeze-manuscript";
import { requestVerification } from "../manuscripts/verify-manuscript";

const idOnly = { type: "object", additionalProperties: false, required: ["id"], properties: { id: { type: "string", format: "uuid" } } } as const;
const onManuscript = { target: (i: { id: string }) => manuscriptTarget(i.id), access: "read" as const };

/** Body of a new manuscript. */
export const createManuscriptSchema = {
  type: "object", additionalProperties: false, required: ["groupId", "title"],
  properties: { groupId: { type: "string", format: "uuid" }, title: { type: "string", minLength: 1, maxLength: 300 }, journal: { type: ["string", "null"], maxLength: 200 } },
} as const;

export const createManuscriptAction = defineAction({
  name: "manuscripts.create",
  schema: createManuscriptSchema,
  policy: { roles: PIS },
  run: async (i: { groupId: string; title: string; journal?: string | null }, { who, audit }) => ({ id: (await createManuscript(audit, who, i)).id }),
});

export const addExhibitAction = defineAction({
  name: "manuscripts.addExhibit",
  schema: { type: "object", additionalProperties: false, required: ["id", "exhibit"], properties: { id: { type: "string", format: "uuid" }, exhibit: exhibitBodySchema } },
  policy: { roles: RESEARCHERS, ...onManuscript },
  run: async (i: { id: string; exhibit: ExhibitBody }, { who, audit }) => ({ id: (await addExhibit(audit, who, i.id, await exhibitFromBody(who, i.exhibit))).id }),
});

export const freezeManuscriptAction = defineAction({
  name: "manuscripts.freeze",
  schema: idOnly,
  policy: { roles: PIS, ...onManuscript },
  run: async (i: { id: string }, { who, audit }) => ({ state: (await freezeManuscript(audit, who, i.id)).state }),
});

// Only a PI unfreezes (not an admin): the PI signs the paper (lib/manuscripts/freeze-manuscript.ts).
export const unfreezeManuscriptAction = defineAction({
  name: "manuscripts.unfreeze",
  schema: { type: "object", additionalProperties: false, required: ["id", "reason"], properties: { id: { type: "string", format: "uuid" }, reason: { type: "string", minLength: 1, maxLength: 2000 } } },
  policy: { roles: ["pi"], ...onManuscript },
  run: async (i: { id: string; reason: string }, { who, audit }) => ({ state: (await unfreezeManuscript(audit, who, i.id, i.reason)).state }),
});

export const verifyManuscriptAction = defineAction({
  name: "manuscripts.verify",
  schema: idOnly,
  policy: { roles: RESEARCHERS, ...onManuscript },
  run: async (i: { id: string }, { who, audit }) => ({ verificationId: await requestVerification(audit, who, i.id) }),
});


// The creator or a PI leading the group adds a researcher of the group; addCollaborator enforces who and whom.
export const addCollaboratorAction = defineAction({
  name: "manuscripts.addCollaborator",
  schema: { type: "object", additionalProperties: false, required: ["id", "userId"], properties: { id: { type: "string", format: "uuid" }, userId: { type: "string", format: "uuid" } } },
  policy: { roles: PIS, ...onManuscript },
  run: async (i: { id: string; userId: string }, { who, audit }) => { await addCollaborator(audit, who, i.id, i.userId); return { userId: i.userId }; },
});
