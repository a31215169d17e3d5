import { data } from "react-router";

export function loader() {
  throw data({ message: "We could not find that page." }, { status: 404 });
}

export default function NotFound() {
  return null;
}
