// People for authorization tests, created in the running stack's database (names carry a run tag,
// so repeated runs never collide). Each role exists as a member of group A and as an outsider (group B).
import crypto from "node:crypto";
import { db } from "@/models";
import { hashPassword } from "@/lib/auth/passwords";
import { createApiToken } from "@/lib/auth/tokens";
import { loadIdentity, type Identity } from "@/lib/auth/identity";
import { ROLES, type Role } from "@/lib/auth/roles";
import { signIn } from "../../support/http";

export type Where = "member" | "outsider";
export type Person = { role: Role; where: Where; email: string; id: string; cookie: string; token: string; who: Identity };

export async function makeMatrixPeople() {
  const tag = crypto.randomBytes(4).toString("hex");
  const m = db();
  const groupA = await m.Group.create({ slug: `mx-a-${tag}`, name: `Matrix A ${tag}`, institute: "test" });
  const groupB = await m.Group.create({ slug: `mx-b-${tag}`, name: `Matrix B ${tag}`, institute: "test" });
  const password = "matrix-pass-" + tag;
  const passwordHash = await hashPassword(password);
  const people: Person[] = [];
  for (const role of ROLES) {
    for (const where of ["member", "outsider"] as Where[]) {
      const email = `${role}.${where}.${tag}@matrix.example`;
      const user = await m.User.create({ email, name: `${role} ${where}`, role, passwordHash });
      await m.Membership.create({ userId: user.id, groupId: where === "member" ? groupA.id : groupB.id, isLead: role === "pi" });
      const cookie = await signIn(email, password);
      if (!cookie) throw new Error(`could not sign in ${email}`);
      const { token } = await createApiToken({ actorId: user.id, ip: null, requestId: null }, user.id, "matrix", 1);
      const who = (await loadIdentity(user.id, "session"))!;
      people.push({ role, where, email, id: user.id, cookie, token, who });
    }
  }
  return { tag, groupA, groupB, people, password };
}
