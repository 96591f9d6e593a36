import { redirect } from "react-router";
import type { Route } from "./+types/sign-out";
import { protectedAction } from "~/auth/csrf.server";
import { endSession } from "~/auth/session.server";

/** POST /sign-out — ends this browser's session (its row is deleted). */
export const action = protectedAction(async ({ request }: Route.ActionArgs) => {
  return redirect("/", { headers: { "Set-Cookie": await endSession(request) } });
});

/** A GET never signs anyone out (a link or prefetch must not); the account page has the button. */
export function loader() {
  return redirect("/account");
}
