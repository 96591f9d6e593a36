import { data } from "react-router";

export function loader() {
  throw data({ message: "There is nothing at this address." }, { status: 404 });
}

export default function NotFound() {
  return null;
}
