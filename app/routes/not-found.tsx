import { notFound } from "~/lib/http";

export function loader() {
  throw notFound("There is nothing at this address.");
}

export default function NotFound() {
  return null;
}
