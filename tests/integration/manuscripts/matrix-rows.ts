// Authorization-matrix rows for what the manuscript UI added (spread into tests/integration/auth/matrix.test.ts).
import type { ActionDef } from "@/lib/auth/action";
import type { Role } from "@/lib/auth/roles";
import * as manuscriptActions from "@/lib/actions/manuscripts";
import type { makeMatrixPeople, Person } from "@/tests/integration/auth/people-fixture";
import { matrixManuscript } from "@/tests/integration/provenance/matrix-rows";

type Fx = Awaited<ReturnType<typeof makeMatrixPeople>>;
type Expect = Partial<Record<Role | "anonymous", number | { member: number; outsider: number }>>;

/** Action rows (same shape as matrix.test.ts's ActionRow). */
// eslint-disable-next-line @typescript-eslint/no-explicit-any -- rows of different actions share one list
export const MANUSCRIPT_UI_ACTIONS: { file: string; def: ActionDef<any, any>; input: (fx: Fx, p: Person) => unknown | Promise<unknown>; expect: Expect }[] = [
  // the leading PI adds the group's researcher to a fresh draft; a PI of another group is refused by scope (404)
  { file: "app/(app)/manuscripts/actions/add-collaborator.ts", def: manuscriptActions.addCollaboratorAction,
    input: async (fx) => ({ id: await matrixManuscript(fx, "draft"), userId: fx.people.find((p) => p.role === "researcher" && p.where === "member")!.id }),
    expect: { viewer: 403, researcher: 403, pi: { member: 200, outsider: 404 }, coordinator: 403, admin: 200 } },
];
