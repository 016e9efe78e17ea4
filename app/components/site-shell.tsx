import { Form, NavLink } from "react-router";
import { navigationFor, roleLabels, type SessionUser } from "~/permissions";
import { UnitToggle } from "~/units";

/** The shelf mark: three rules of falling length, the middle one in the accent. */
export function ShelfMark({ className = "h-7 w-7" }: { className?: string }) {
  return (
    <svg viewBox="0 0 32 32" className={className} aria-hidden="true">
      <rect width="32" height="32" rx="6" fill="#26221d" />
      <rect x="6" y="8" width="20" height="3" rx="1" fill="#f6f1e6" />
      <rect x="6" y="14.5" width="14" height="3" rx="1" fill="#e0a37f" />
      <rect x="6" y="21" width="8" height="3" rx="1" fill="#f6f1e6" />
    </svg>
  );
}

export function SiteHeader({ user }: { user: SessionUser | null }) {
  const nav = navigationFor(user);
  return (
    <header className="border-b border-rule bg-card/70">
      <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-3 sm:px-6">
        <a href="/" className="flex items-center gap-2 text-ink no-underline hover:text-ink" aria-label="Ergoshelf, front page">
          <ShelfMark />
          <span className="text-lg font-bold tracking-tight">Ergoshelf</span>
        </a>
        <nav aria-label="Main" className="order-3 w-full sm:order-none sm:w-auto">
          <ul className="flex flex-wrap gap-1">
            {nav.map((item) => (
              <li key={item.to}>
                <NavLink
                  to={item.to}
                  className={({ isActive }) =>
                    `block rounded px-3 py-1.5 text-sm font-semibold no-underline ${
                      isActive ? "bg-ink text-paper hover:text-paper" : "text-ink hover:bg-paper-deep hover:text-ink"
                    }`
                  }
                >
                  {item.label}
                </NavLink>
              </li>
            ))}
          </ul>
        </nav>
        <div className="ml-auto flex items-center gap-3 text-sm">
          <UnitToggle />
          {user ? (
            <>
              <span className="hidden text-right leading-tight sm:block">
                <span className="block font-semibold">{user.name}</span>
                <span className="block text-xs text-ink-soft">{roleLabels[user.role]}</span>
              </span>
              <Form method="post" action="/sign-out">
                <button type="submit" className="btn btn-quiet">
                  Sign out
                </button>
              </Form>
            </>
          ) : (
            <a href="/sign-in" className="btn btn-quiet no-underline">
              Sign in
            </a>
          )}
        </div>
      </div>
    </header>
  );
}

export function SiteFooter({ engineVersion }: { engineVersion: string }) {
  return (
    <footer className="mt-12 border-t border-rule bg-paper-deep/60 text-sm text-ink-soft">
      <div className="mx-auto flex max-w-6xl flex-wrap justify-between gap-4 px-4 py-6 sm:px-6">
        <p>
          Ergoshelf — a curated library of stationary process models.{" "}
          <span className="figures">
            Engine <code>{engineVersion}</code>
          </span>
        </p>
        <p className="max-w-xl">
          Figures are model-based. For security use, a model estimate does not replace validation of a physical entropy
          source under the applicable standard by an accredited laboratory.
        </p>
      </div>
    </footer>
  );
}
