// Authorization-matrix rows for the allocation routes and actions (spread into
// tests/integration/auth/matrix.test.ts). Changes (grant, top-up, adjust, state, caps): coordinators
// and admins only. Reads of one allocation: members of its group (outsiders get 404), coordinators, admins.
import crypto from "node:crypto";
import type { ActionDef } from "@/lib/auth/action";
import type { Role } from "@/lib/auth/roles";
import * as allocationActions from "@/lib/actions/allocations";
import { makeAllocation } from "@/tests/support/db";
import type { makeMatrixPeople, Person } from "@/tests/integration/auth/people-fixture";

type Fx = Awaited<ReturnType<typeof makeMatrixPeople>>;
type Expect = Partial<Record<Role | "anonymous", number | { member: number; outsider: number }>>;
type RouteRow = { file: string; method: string; path: (fx: Fx, p: Person | null) => string | Promise<string>; body?: (fx: Fx, p: Person | null) => unknown; expect: Expect };
type ActionRow = { file: string; def: ActionDef<any, any>; input: (fx: Fx, p: Person) => unknown | Promise<unknown>; expect: Expect };

const STAFF = (ok: number): Expect => ({ anonymous: 401, viewer: 403, researcher: 403, pi: 403, coordinator: ok, admin: ok });
const MEMBERS_READ: Expect = { anonymous: 401, viewer: { member: 200, outsider: 404 }, researcher: { member: 200, outsider: 404 }, pi: { member: 200, outsider: 404 }, coordinator: 200, admin: 200 };
const uniq = () => crypto.randomBytes(5).toString("hex");
/** A fresh allocation of group A (each call), so state changes never collide. */
const freshA = async (fx: Fx) => (await makeAllocation(fx.groupA, 1000)).id;
let shared: string | null = null;
const sharedA = async (fx: Fx) => (shared ??= (await makeAllocation(fx.groupA, 1000)).id);
const grant = (fx: Fx) => ({ groupId: fx.groupA.id, name: `matrix ${uniq()}`, periodStart: "2026-01-01", periodEnd: "2027-01-01", coreHours: 500 });

export const ALLOCATION_ROUTES: RouteRow[] = [
  { file: "app/api/v1/allocations/route.ts", method: "POST", path: () => "/api/v1/allocations", body: grant, expect: STAFF(201) },
  { file: "app/api/v1/allocations/[id]/route.ts", method: "GET", path: async (fx) => `/api/v1/allocations/${await sharedA(fx)}`, expect: MEMBERS_READ },
  { file: "app/api/v1/allocations/[id]/report/route.ts", method: "GET", path: async (fx) => `/api/v1/allocations/${await sharedA(fx)}/report`, expect: MEMBERS_READ },
  { file: "app/api/v1/allocations/[id]/ledger/route.ts", method: "POST", path: async (fx) => `/api/v1/allocations/${await sharedA(fx)}/ledger`, body: () => ({ kind: "top-up", coreHours: 1 }), expect: STAFF(201) },
  { file: "app/api/v1/allocations/[id]/state/route.ts", method: "POST", path: async (fx) => `/api/v1/allocations/${await freshA(fx)}/state`, body: () => ({ state: "suspended", reason: "matrix check" }), expect: STAFF(200) },
  { file: "app/api/v1/allocations/[id]/caps/route.ts", method: "POST", path: async (fx) => `/api/v1/allocations/${await sharedA(fx)}/caps`, body: () => ({ subject: "everyone", coreHours: 900 }), expect: STAFF(201) },
];

export const ALLOCATION_ACTIONS: ActionRow[] = [
  { file: "app/(app)/allocations/actions/grant-allocation.ts", def: allocationActions.grantAllocationAction, input: grant, expect: STAFF(200) },
  { file: "app/(app)/allocations/actions/change-balance.ts", def: allocationActions.changeBalanceAction, input: async (fx) => ({ id: await sharedA(fx), change: { kind: "adjust", coreHours: -1, reason: "matrix correction" } }), expect: STAFF(200) },
  { file: "app/(app)/allocations/actions/set-allocation-state.ts", def: allocationActions.setAllocationStateAction, input: async (fx) => ({ id: await freshA(fx), change: { state: "closed", reason: "matrix close" } }), expect: STAFF(200) },
  { file: "app/(app)/allocations/actions/set-cap.ts", def: allocationActions.setCapAction, input: async (fx) => ({ id: await sharedA(fx), change: { subject: "ensemble", share: 0.5 } }), expect: STAFF(200) },
];
