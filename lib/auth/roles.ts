export const ROLES = ["viewer", "researcher", "pi", "coordinator", "admin"] as const;
export type Role = (typeof ROLES)[number];

/** Convenience role sets, as DESIGN.md's table grants them. */
export const ANY: readonly Role[] = ROLES;
export const RESEARCHERS: readonly Role[] = ["researcher", "pi", "admin"];
export const PIS: readonly Role[] = ["pi", "admin"];
export const COORDINATORS: readonly Role[] = ["coordinator", "admin"];
export const ADMINS: readonly Role[] = ["admin"];

/** Roles that see every group's data, not only their own. */
export const crossGroup = (role: Role) => role === "coordinator" || role === "admin";
