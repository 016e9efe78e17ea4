// GET /library/:slug/e/:edition/cite.bib: the edition's citation as BibTeX.
import { getEdition, getModelWithEditions } from "~/.server/library.server";
import { answerCitation, type CitationLookup } from "~/citations";
import type { Route } from "./+types/cite-bibtex";

const lookup: CitationLookup = {
  edition: getEdition,
  editionNumbers: async (slug) => (await getModelWithEditions(slug))?.editions.map((e) => e.number) ?? null,
};

export function loader({ request, params }: Route.LoaderArgs) {
  return answerCitation(request, params, "bibtex", lookup);
}
