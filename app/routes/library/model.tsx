// Placeholder: replaced by the model page.
import { data } from "react-router";
export function loader() {
  throw data({ message: "This page is being built." }, { status: 404 });
}
export default function Page() {
  return null;
}
