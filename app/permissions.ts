/**
 * Roles and what they may do: the pure twin of the server's checks. The UI uses `can` to decide
 * what to show; every loader and action checks again on the server (app/.server/auth.server.ts).
 */
export const roles = ["contributor", "curator", "admin"] as const;
export type Role = (typeof roles)[number];

/** A visitor is the absence of a user. */
export interface SessionUser {
  id: string;
  email: string;
  name: string;
  role: Role;
}

export const roleRank: Record<Role, number> = { contributor: 1, curator: 2, admin: 3 };

export const roleLabels: Record<Role, string> = {
  contributor: "Contributor",
  curator: "Curator",
  admin: "Administrator",
};

/** Actions, each granted from a minimum role upwards (null: visitors too). */
export const actionMinimumRole = {
  "library:read": null,
  "citation:export": null,
  "workspace:use": "contributor",
  "proposal:submit": "contributor",
  "sample:upload": "contributor",
  "token:manage": "contributor",
  "review:use": "curator",
  "edition:publish": "curator",
  "edition:retract": "curator",
  "admin:use": "admin",
  "user:manage": "admin",
  "audit:read": "admin",
} as const satisfies Record<string, Role | null>;
export type Action = keyof typeof actionMinimumRole;

/** Whether a user (or a visitor, null) holds at least the given role. */
export function hasRole(user: Pick<SessionUser, "role"> | null | undefined, minimum: Role): boolean {
  return !!user && roleRank[user.role] >= roleRank[minimum];
}

/** Whether a user (or a visitor, null) may perform an action. */
export function can(user: Pick<SessionUser, "role"> | null | undefined, action: Action): boolean {
  const minimum = actionMinimumRole[action];
  return minimum === null || hasRole(user, minimum);
}

/** The navigation a user sees, in order. */
export function navigationFor(user: Pick<SessionUser, "role"> | null | undefined) {
  const items: { to: string; label: string }[] = [{ to: "/library", label: "Library" }];
  if (can(user, "workspace:use")) items.push({ to: "/workspace", label: "Workspace" });
  if (can(user, "review:use")) items.push({ to: "/review", label: "Review" });
  if (can(user, "admin:use")) items.push({ to: "/admin", label: "Admin" });
  return items;
}

/** A redirect target is honoured only when it is a local path (no scheme, no host, no `//`). */
export function safeRedirectPath(target: string | null | undefined, fallback = "/"): string {
  if (!target || !target.startsWith("/") || target.startsWith("//") || target.startsWith("/\\")) return fallback;
  try {
    const url = new URL(target, "http://local.invalid");
    if (url.origin !== "http://local.invalid") return fallback;
    return url.pathname + url.search + url.hash;
  } catch {
    return fallback;
  }
}
