// Input schemas of the allocation lifecycle (API routes and server actions share them). Rules that
// tie fields together (an adjustment needs a reason, a person cap a userId) are checked in
// lib/allocations/manage-allocations.ts with field paths, not in the schema.
const hours = { type: "number", exclusiveMinimum: 0, maximum: 1e11 } as const;
const reason = { type: "string", minLength: 3, maxLength: 500, pattern: "\\S" } as const;
const uuid = { type: "string", format: "uuid" } as const;

/** A new allocation with its first grant. */
export type GrantInput = {
  groupId: string; name: string; periodStart: string; periodEnd: string; coreHours: number;
  clusterId?: string | null; note?: string;
};
export const grantSchema = {
  type: "object", additionalProperties: false, required: ["groupId", "name", "periodStart", "periodEnd", "coreHours"],
  properties: {
    groupId: uuid, name: { type: "string", minLength: 1, maxLength: 120, pattern: "\\S" },
    periodStart: { type: "string", format: "date" }, periodEnd: { type: "string", format: "date" },
    coreHours: hours, clusterId: { anyOf: [uuid, { type: "null" }] }, note: { type: "string", maxLength: 500 },
  },
} as const;

/** A top-up (more hours granted) or an adjustment (either sign, reason required). */
export type BalanceChangeInput = { kind: "top-up"; coreHours: number; reason?: string } | { kind: "adjust"; coreHours: number; reason: string };
export const balanceChangeSchema = {
  type: "object", additionalProperties: false, required: ["kind", "coreHours"],
  properties: { kind: { enum: ["top-up", "adjust"] }, coreHours: { type: "number", minimum: -1e11, maximum: 1e11 }, reason },
} as const;

/** A lifecycle change: suspend, resume (back to active) or close, with a reason. */
export type StateChangeInput = { state: "active" | "suspended" | "closed"; reason: string };
export const stateChangeSchema = {
  type: "object", additionalProperties: false, required: ["state", "reason"],
  properties: { state: { enum: ["active", "suspended", "closed"] }, reason },
} as const;

/** A cap: for one person, for everyone, or per ensemble; coreHours or share, neither to lift it. */
export type CapInput = { subject: "person" | "everyone" | "ensemble"; userId?: string; coreHours?: number; share?: number; reason?: string };
export const capSchema = {
  type: "object", additionalProperties: false, required: ["subject"],
  properties: {
    subject: { enum: ["person", "everyone", "ensemble"] }, userId: uuid, coreHours: hours,
    share: { type: "number", exclusiveMinimum: 0, maximum: 1 }, reason: { type: "string", maxLength: 500 },
  },
} as const;

/** Action inputs carry the allocation id beside the change. */
export const withId = <S extends object>(change: S) => ({
  type: "object", additionalProperties: false, required: ["id", "change"], properties: { id: uuid, change },
}) as const;
