// GET /library/:slug — the model page at its current edition.
import { data } from "react-router";
import { loadModelPage } from "~/.server/model-page.server";
import { ModelPage, ModelPageError, modelPageMeta } from "~/components/model/model-page";
import { modelParamSchema, parseDiffQuery } from "~/components/model/page-query";
import stylesheet from "~/styles/model-page.css?url";
import type { Route } from "./+types/model";

export const links: Route.LinksFunction = () => [{ rel: "stylesheet", href: stylesheet }];

export const meta: Route.MetaFunction = ({ loaderData }) => modelPageMeta(loaderData);

export async function loader({ params, request }: Route.LoaderArgs) {
  const p = modelParamSchema.safeParse(params);
  if (!p.success) throw data({ message: "A model address needs a slug, like /library/buoy-k07-uplink-burst." }, { status: 400 });
  const q = parseDiffQuery(request.url);
  if (!q.ok) throw data({ message: q.message }, { status: 400 });
  return data(await loadModelPage({ slug: p.data.slug, from: q.from, to: q.to, url: request.url }));
}

export default function ModelRoute({ loaderData }: Route.ComponentProps) {
  return <ModelPage page={loaderData} />;
}

export const ErrorBoundary = ModelPageError;
