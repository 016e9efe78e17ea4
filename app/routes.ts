import { index, layout, prefix, route, type RouteConfig } from "@react-router/dev/routes";

export default [
  index("routes/home.tsx"),

  // Accounts
  route("sign-in", "routes/sign-in.tsx"),
  route("sign-out", "routes/sign-out.tsx"),

  // The public library
  ...prefix("library", [
    index("routes/library/index.tsx"),
    route(":slug", "routes/library/model.tsx"),
    route(":slug/e/:edition", "routes/library/edition.tsx"),
    route(":slug/e/:edition/cite.bib", "routes/library/cite-bibtex.ts"),
    route(":slug/e/:edition/cite.ris", "routes/library/cite-ris.ts"),
    route(":slug/e/:edition/cite.json", "routes/library/cite-csl.ts"),
  ]),

  // A contributor's private workspace
  layout("routes/workspace/layout.tsx", [
    ...prefix("workspace", [
      index("routes/workspace/index.tsx"),
      route("new", "routes/workspace/new.tsx"),
      route("proposals", "routes/workspace/proposals.tsx"),
      route("proposals/:id", "routes/workspace/proposal.tsx"),
      route(":id", "routes/workspace/item.tsx"),
      route(":id/submit", "routes/workspace/submit.tsx"),
    ]),
  ]),

  // Curators' review
  layout("routes/review/layout.tsx", [
    ...prefix("review", [
      index("routes/review/index.tsx"),
      route("retract/:slug/:edition", "routes/review/retract.tsx"),
      route(":id", "routes/review/proposal.tsx"),
    ]),
  ]),

  // Administration
  layout("routes/admin/layout.tsx", [...prefix("admin", [index("routes/admin/index.tsx")])]),

  // Machine-readable resources
  route("healthz", "routes/healthz.ts"),
  ...prefix("api/v1", [
    route("compute", "routes/api/compute.ts"),
    route("search", "routes/api/search.ts"),
    route("models", "routes/api/models.ts"),
    route("models/:slug", "routes/api/model.ts"),
    route("models/:slug/editions/:edition", "routes/api/edition.ts"),
  ]),

  // Development only: the fake mail server's inbox
  route("dev/mail", "routes/dev/mail.tsx"),

  route("*", "routes/not-found.tsx"),
] satisfies RouteConfig;
