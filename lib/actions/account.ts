// Server-action definitions of the account page (the "use server" files in app/ call these).
import { defineAction } from "../auth/action";
import { ANY, type Role } from "../auth/roles";
import { changePassword, MIN_PASSWORD_LENGTH } from "../account/change-password";
import { createApiToken, revokeApiToken } from "../auth/tokens";

/** Who may own API tokens (DESIGN.md: researcher and up; coordinators automate too). */
export const TOKEN_OWNERS: readonly Role[] = ["researcher", "pi", "coordinator", "admin"];

export const changePasswordAction = defineAction({
  name: "account.changePassword",
  schema: {
    type: "object", additionalProperties: false, required: ["current", "next"],
    properties: { current: { type: "string", minLength: 1, maxLength: 200 }, next: { type: "string", minLength: MIN_PASSWORD_LENGTH, maxLength: 200 } },
  },
  policy: { roles: ANY },
  run: (i: { current: string; next: string }, { who, audit }) => changePassword(audit, who.userId, i.current, i.next),
});

export const tokenCreateSchema = {
  type: "object", additionalProperties: false, required: ["name"],
  properties: { name: { type: "string", minLength: 1, maxLength: 80 }, expiresInDays: { type: ["integer", "null"], minimum: 1, maximum: 365 } },
} as const;

export const createTokenAction = defineAction({
  name: "account.createToken",
  schema: tokenCreateSchema,
  policy: { roles: TOKEN_OWNERS },
  run: (i: { name: string; expiresInDays?: number | null }, { who, audit }) => createApiToken(audit, who.userId, i.name, i.expiresInDays ?? null),
});

export const revokeTokenAction = defineAction({
  name: "account.revokeToken",
  schema: { type: "object", additionalProperties: false, required: ["id"], properties: { id: { type: "string", format: "uuid" } } },
  policy: { roles: TOKEN_OWNERS },
  run: (i: { id: string }, { who, audit }) => revokeApiToken(audit, who.userId, i.id),
});
