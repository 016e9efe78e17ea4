import "@fontsource/noto-sans/400.css";
import "@fontsource/noto-sans/600.css";
import "@fontsource/noto-sans/700.css";
import "@fontsource/noto-sans-mono/400.css";
import "./app.css";

import { isRouteErrorResponse, Links, Meta, Outlet, Scripts, ScrollRestoration, useRouteLoaderData } from "react-router";
import type { Route } from "./+types/root";
import { getUser } from "./.server/auth.server";
import { publicEnv } from "./.server/env.server";
import { SiteFooter, SiteHeader } from "./components/site-shell";
import { ENGINE_VERSION } from "./engine/version";
import { UnitProvider, unitFromCookie } from "./units";

export const links: Route.LinksFunction = () => [{ rel: "icon", href: "/favicon.svg", type: "image/svg+xml" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  return { user, env: publicEnv(), engineVersion: ENGINE_VERSION, unit: unitFromCookie(request.headers.get("Cookie")) };
}

export function Layout({ children }: { children: React.ReactNode }) {
  const root = useRouteLoaderData<typeof loader>("root");
  return (
    <html lang="en">
      <head>
        <meta charSet="utf-8" />
        <meta name="viewport" content="width=device-width, initial-scale=1" />
        <meta name="color-scheme" content="light" />
        <Meta />
        <Links />
      </head>
      <body className="flex min-h-screen flex-col">
        <UnitProvider initial={root?.unit ?? "bits"}>
        <a href="#main" className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:bg-card focus:p-2">
          Skip to content
        </a>
        <SiteHeader user={root?.user ?? null} />
        <main id="main" className="mx-auto w-full max-w-6xl flex-1 px-4 py-8 sm:px-6">
          {children}
        </main>
        <SiteFooter engineVersion={root?.engineVersion ?? ENGINE_VERSION} />
        </UnitProvider>
        <ScrollRestoration />
        <Scripts />
      </body>
    </html>
  );
}

export default function App() {
  return <Outlet />;
}

export function ErrorBoundary({ error }: Route.ErrorBoundaryProps) {
  let status = 500;
  let title = "Something went wrong on our side";
  let detail = "The error has been logged. Try again in a moment; if it keeps happening, tell an administrator what you were doing.";
  if (isRouteErrorResponse(error)) {
    status = error.status;
    const message = typeof error.data === "object" && error.data && "message" in error.data ? String(error.data.message) : null;
    if (status === 404) {
      title = "We could not find that page";
      detail = message ?? "The address may be mistyped, or the page may have moved. Models and editions keep their addresses for good.";
    } else if (status === 403) {
      title = "This area is not open to your account";
      detail = message ?? "Your role does not include this area.";
    } else if (status === 401) {
      title = "Please sign in";
      detail = message ?? "This page needs an account.";
    } else {
      title = error.statusText || title;
      detail = message ?? detail;
    }
  } else if (import.meta.env.DEV && error instanceof Error) {
    detail = error.message;
  }
  return (
    <section className="mx-auto max-w-2xl py-10" aria-labelledby="error-title">
      <p className="eyebrow">Error {status}</p>
      <h1 id="error-title" className="mt-2 text-3xl font-bold">
        {title}
      </h1>
      <p className="mt-3 text-ink-soft">{detail}</p>
      <div className="mt-6 flex flex-wrap gap-3">
        <a className="btn btn-primary" href="/library">
          Browse the library
        </a>
        <a className="btn btn-quiet" href="/">
          Go to the front page
        </a>
      </div>
    </section>
  );
}
