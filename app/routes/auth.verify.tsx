import { data, Link } from "react-router";
import type { Route } from "./+types/auth.verify";
import { safeRedirect } from "~/auth/session.server";
import { verifyCode } from "~/auth/sign-in.server";
import { Notice } from "~/components/ui/form";

/** GET /auth/verify?t=… — the magic link from the sign-in e-mail (never cached by the worker). */
export async function loader({ request }: Route.LoaderArgs) {
  const url = new URL(request.url);
  const redirectTo = safeRedirect(url.searchParams.get("redirectTo"));
  const answer = await verifyCode(request, { code: null, redirectTo });
  if (answer instanceof Response) return answer;
  // Not a redirect: the link could not be checked in this browser.
  return data(
    { error: answer.data.error ?? "This sign-in link cannot be used here.", redirectTo },
    { status: answer.init?.status ?? 400 },
  );
}

export function meta() {
  return [{ title: "Signing in · Tilldawn" }];
}

export default function Verify({ loaderData }: Route.ComponentProps) {
  return (
    <div className="mx-auto max-w-md space-y-4">
      <h1 className="text-3xl font-bold">This link did not sign you in</h1>
      <Notice tone="error">{loaderData.error}</Notice>
      <p className="text-night-200">
        A sign-in link works only in the browser where the code was asked for. You can type the 6-digit code from
        the e-mail there instead, or ask for a new code here.
      </p>
      <Link
        to={`/sign-in?${new URLSearchParams({ redirectTo: loaderData.redirectTo })}`}
        className="inline-flex min-h-12 items-center rounded-xl bg-dawn-500 px-5 font-bold text-night-950"
      >
        Sign in
      </Link>
    </div>
  );
}
