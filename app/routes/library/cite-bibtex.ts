// Placeholder: replaced by its resource route.
export function loader() {
  return new Response("Not built yet", { status: 404 });
}
