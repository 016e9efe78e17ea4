import { index, layout, prefix, route, type RouteConfig } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),

  // Accounts
  route("sign-in", "routes/sign-in.tsx"),
  route("sign-out", "routes/sign-out.tsx"),

  // The public library
  ...prefix("library", [index("routes/library/index.tsx")]),

  // A contributor's private workspace
  layout("routes/workspace/layout.tsx", [...prefix("workspace", [index("routes/workspace/index.tsx")])]),

  // Curators' review
  layout("routes/review/layout.tsx", [...prefix("review", [index("routes/review/index.tsx")])]),

  // Administration
  layout("routes/admin/layout.tsx", [...prefix("admin", [index("routes/admin/index.tsx")])]),

  // Machine-readable resources
  route("healthz", "routes/healthz.ts"),
  ...prefix("api/v1", [route("compute", "routes/api/compute.ts")]),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
