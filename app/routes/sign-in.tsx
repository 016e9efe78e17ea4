import { data, Form, redirect, useNavigation, useSearchParams } from "react-router";
import { authenticator, getUser, SignInError } from "~/.server/auth.server";
import { startSession } from "~/.server/session.server";
import { safeRedirectPath } from "~/permissions";
import type { Route } from "./+types/sign-in";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Ergoshelf" }];

export async function loader({ request }: Route.LoaderArgs) {
  const user = await getUser(request);
  const target = safeRedirectPath(new URL(request.url).searchParams.get("redirectTo"), "/library");
  if (user) throw redirect(target);
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const target = safeRedirectPath(new URL(request.url).searchParams.get("redirectTo"), "/library");
  try {
    const user = await authenticator.authenticate("form", request);
    const cookie = await startSession(request, user.id);
    return redirect(target, { headers: { "Set-Cookie": cookie } });
  } catch (error) {
    if (error instanceof SignInError) return data({ error: error.message }, { status: 400 });
    throw error;
  }
}

const demoAccounts = [
  ["contributor@example.org", "Contributor"],
  ["curator@example.org", "Curator"],
  ["admin@example.org", "Administrator"],
] as const;

export default function SignIn({ matches, actionData }: Route.ComponentProps) {
  const result = actionData as { error?: string } | undefined;
  const [params] = useSearchParams();
  const navigation = useNavigation();
  const busy = navigation.state === "submitting";
  const redirectTo = params.get("redirectTo");
  const action = redirectTo ? `/sign-in?redirectTo=${encodeURIComponent(redirectTo)}` : "/sign-in";
  const demo = (matches[0]?.loaderData as { env?: { demo?: boolean } } | undefined)?.env?.demo ?? false;
  const error = result?.error;
  return (
    <div className="mx-auto grid max-w-4xl gap-8 md:grid-cols-[1fr_18rem]">
      <section className="card p-6 sm:p-8" aria-labelledby="sign-in-title">
        <p className="eyebrow">Account</p>
        <h1 id="sign-in-title" className="mt-1 text-2xl font-bold">
          Sign in to Ergoshelf
        </h1>
        <p className="mt-2 text-sm text-ink-soft">
          Reading the library needs no account. Sign in to keep a workspace, submit proposals or review them.
        </p>
        {redirectTo ? (
          <p className="mt-4 rounded border border-rule bg-paper-deep/60 px-3 py-2 text-sm" role="status">
            Sign in to continue to <code>{safeRedirectPath(redirectTo)}</code>.
          </p>
        ) : null}
        <Form method="post" action={action} className="mt-6 space-y-4" noValidate>
          {error ? (
            <p id="sign-in-error" role="alert" className="rounded border border-bad/40 bg-bad/5 px-3 py-2 text-sm text-bad">
              {error}
            </p>
          ) : null}
          <div>
            <label htmlFor="email" className="block text-sm font-semibold">
              E-mail address
            </label>
            <input
              id="email"
              name="email"
              type="email"
              autoComplete="username"
              required
              className="field mt-1"
              aria-invalid={error ? true : undefined}
              aria-describedby={error ? "sign-in-error" : undefined}
            />
          </div>
          <div>
            <label htmlFor="password" className="block text-sm font-semibold">
              Password
            </label>
            <input
              id="password"
              name="password"
              type="password"
              autoComplete="current-password"
              required
              className="field mt-1"
              aria-invalid={error ? true : undefined}
              aria-describedby={error ? "sign-in-error" : undefined}
            />
          </div>
          <button type="submit" className="btn btn-primary w-full justify-center" disabled={busy}>
            {busy ? "Signing in…" : "Sign in"}
          </button>
        </Form>
      </section>
      {demo ? (
        <aside className="card self-start p-5 text-sm" aria-labelledby="demo-title">
          <h2 id="demo-title" className="font-semibold">
            Demo accounts
          </h2>
          <p className="mt-1 text-ink-soft">
            This server runs with demo data. Every demo account uses the password <code className="font-mono">ergoshelf-demo</code>.
          </p>
          <ul className="mt-3 space-y-2">
            {demoAccounts.map(([email, role]) => (
              <li key={email}>
                <span className="block font-mono text-xs">{email}</span>
                <span className="text-ink-soft">{role}</span>
              </li>
            ))}
          </ul>
        </aside>
      ) : null}
    </div>
  );
}
