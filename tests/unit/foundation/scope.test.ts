import { describe, expect, it } from "vitest";
import { checkScope } from "@/lib/auth/scope";
import type { Identity } from "@/lib/auth/identity";
import type { Role } from "@/lib/auth/roles";

const who = (role: Role, groups: string[], leads: string[] = []): Identity => ({ userId: "u1", email: "e", name: "n", role, groupIds: groups, leadGroupIds: leads, via: "session" });
const code = (f: () => void) => { try { f(); return "ok"; } catch (e) { return (e as { code: string }).code; } };
const ens = (ownerId: string) => ({ type: "ensemble", groupId: "g1", ownerId });

describe("group scope", () => {
  it("outsiders get not_found (existence does not leak), members read", () => {
    expect(code(() => checkScope(who("researcher", ["g2"]), ens("u9"), "read"))).toBe("not_found");
    expect(code(() => checkScope(who("viewer", ["g1"]), ens("u9"), "read"))).toBe("ok");
  });
  it("acting needs the owner, a PI leading the group, or admin", () => {
    expect(code(() => checkScope(who("researcher", ["g1"]), ens("u9"), "act"))).toBe("forbidden");
    expect(code(() => checkScope(who("researcher", ["g1"]), ens("u1"), "act"))).toBe("ok");
    expect(code(() => checkScope(who("pi", ["g1"], []), ens("u9"), "act"))).toBe("forbidden");
    expect(code(() => checkScope(who("pi", ["g1"], ["g1"]), ens("u9"), "act"))).toBe("ok");
    expect(code(() => checkScope(who("admin", []), ens("u9"), "act"))).toBe("ok");
  });
  it("coordinators read across groups but do not act on ensembles", () => {
    expect(code(() => checkScope(who("coordinator", []), ens("u9"), "read"))).toBe("ok");
    expect(code(() => checkScope(who("coordinator", []), ens("u9"), "act"))).toBe("forbidden");
    expect(code(() => checkScope(who("coordinator", []), { type: "allocation", groupId: "g1" }, "act"))).toBe("ok");
  });
});
