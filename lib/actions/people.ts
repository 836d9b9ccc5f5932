// Server-action definitions of the People page (admins only).
import { defineAction } from "../auth/action";
import { ADMINS, ROLES, type Role } from "../auth/roles";
import { createPerson, updatePerson, setMembership } from "../people/manage-people";
import { MIN_PASSWORD_LENGTH } from "../account/change-password";

export const personCreateSchema = {
  type: "object", additionalProperties: false, required: ["email", "name", "role", "password"],
  properties: {
    email: { type: "string", format: "email", maxLength: 200 },
    name: { type: "string", minLength: 1, maxLength: 120 },
    role: { enum: [...ROLES] },
    password: { type: "string", minLength: MIN_PASSWORD_LENGTH, maxLength: 200 },
    groupIds: { type: "array", items: { type: "string", format: "uuid" }, maxItems: 50 },
  },
} as const;

export const personUpdateSchema = {
  type: "object", additionalProperties: false, minProperties: 1,
  properties: { role: { enum: [...ROLES] }, active: { type: "boolean" }, name: { type: "string", minLength: 1, maxLength: 120 } },
} as const;

export const membershipSchema = {
  type: "object", additionalProperties: false, required: ["member"],
  properties: { member: { type: "boolean" }, isLead: { type: "boolean" } },
} as const;

type Create = { email: string; name: string; role: Role; password: string; groupIds?: string[] };

export const createPersonAction = defineAction({
  name: "people.create", schema: personCreateSchema, policy: { roles: ADMINS },
  run: (i: Create, { audit }) => createPerson(audit, i),
});

export const updatePersonAction = defineAction({
  name: "people.update",
  schema: { type: "object", additionalProperties: false, required: ["id", "change"], properties: { id: { type: "string", format: "uuid" }, change: personUpdateSchema } },
  policy: { roles: ADMINS },
  run: (i: { id: string; change: { role?: Role; active?: boolean; name?: string } }, { audit }) => updatePerson(audit, i.id, i.change),
});

export const setMembershipAction = defineAction({
  name: "people.setMembership",
  schema: {
    type: "object", additionalProperties: false, required: ["userId", "groupId", "member"],
    properties: { userId: { type: "string", format: "uuid" }, groupId: { type: "string", format: "uuid" }, member: { type: "boolean" }, isLead: { type: "boolean" } },
  },
  policy: { roles: ADMINS },
  run: (i: { userId: string; groupId: string; member: boolean; isLead?: boolean }, { audit }) => setMembership(audit, i.userId, i.groupId, i),
});
