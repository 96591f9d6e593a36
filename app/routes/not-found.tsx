import { data } from "react-router";
import type { Route } from "./+types/not-found";
import { apiError } from "~/lib/http";

export function loader({ request }: Route.LoaderArgs) {
  // Under /api/ the answer is the API's JSON error shape, never a page.
  if (new URL(request.url).pathname.startsWith("/api/")) throw apiError(404, "not_found", "There is no API at this address.");
  throw data({ message: "There is nothing at this address." }, { status: 404 });
}

export default function NotFound() {
  return null;
}
