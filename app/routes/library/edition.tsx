// GET /library/:slug/e/:edition — the citable permalink of one edition (retracted ones still resolve).
import { data } from "react-router";
import { loadModelPage } from "~/.server/model-page.server";
import { ModelPage, ModelPageError, modelPageMeta } from "~/components/model/model-page";
import { editionParamSchema, parseDiffQuery } from "~/components/model/page-query";
import stylesheet from "~/styles/model-page.css?url";
import type { Route } from "./+types/edition";

export const links: Route.LinksFunction = () => [{ rel: "stylesheet", href: stylesheet }];

export const meta: Route.MetaFunction = ({ loaderData }) => modelPageMeta(loaderData);

export async function loader({ params, request }: Route.LoaderArgs) {
  const p = editionParamSchema.safeParse(params);
  if (!p.success) {
    throw data(
      { message: `“${params.edition}” is not an edition number: editions are numbered 1, 2, 3, …`, modelHref: `/library/${params.slug}`, modelTitle: "the model" },
      { status: 400 },
    );
  }
  const q = parseDiffQuery(request.url);
  if (!q.ok) throw data({ message: q.message }, { status: 400 });
  return data(await loadModelPage({ slug: p.data.slug, edition: Number(p.data.edition), from: q.from, to: q.to, url: request.url }));
}

export default function EditionRoute({ loaderData }: Route.ComponentProps) {
  return <ModelPage page={loaderData} />;
}

export const ErrorBoundary = ModelPageError;
