import "server-only";
import { redirect } from "next/navigation";
import { AppError } from "../errors";
import { identify } from "./guard";
import type { Identity } from "./identity";
import type { Role } from "./roles";

/** For server components: the signed-in person, or a redirect to sign-in. */
export async function pageIdentity(): Promise<Identity> {
  try {
    return await identify(null);
  } catch (err) {
    if (err instanceof AppError && err.code === "unauthenticated") redirect("/sign-in");
    throw err;
  }
}

/** Whether the person holds one of the roles (pages render a refusal instead of the content). */
export const hasRole = (who: Identity, roles: readonly Role[]) => roles.includes(who.role);
