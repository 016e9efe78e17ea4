// Every route × role pair that exists: visitors are sent to sign-in, too-low roles get 403.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createUser, get, removeCreatedUsers, type TestUser } from "./fixtures";

type Who = "visitor" | "contributor" | "curator" | "admin";
const who: Who[] = ["visitor", "contributor", "curator", "admin"];

// Expected status per route for each role: 200 open, 302 to sign-in, 403 forbidden.
const matrix: Record<string, Record<Who, number>> = {
  "/": { visitor: 200, contributor: 200, curator: 200, admin: 200 },
  "/library": { visitor: 200, contributor: 200, curator: 200, admin: 200 },
  "/workspace": { visitor: 302, contributor: 200, curator: 200, admin: 200 },
  "/review": { visitor: 302, contributor: 403, curator: 200, admin: 200 },
  "/workspace/proposals": { visitor: 302, contributor: 200, curator: 200, admin: 200 },
  "/review/retract/buoy-k05-sea-state-hourly/1": { visitor: 302, contributor: 403, curator: 200, admin: 200 },
  "/admin": { visitor: 302, contributor: 403, curator: 403, admin: 200 },
  "/healthz": { visitor: 200, contributor: 200, curator: 200, admin: 200 },
  "/no-such-page": { visitor: 404, contributor: 404, curator: 404, admin: 404 },
};

const users: Partial<Record<Who, TestUser>> = {};

beforeAll(async () => {
  users.contributor = await createUser("contributor");
  users.curator = await createUser("curator");
  users.admin = await createUser("admin");
});
afterAll(removeCreatedUsers);

describe("route × role", () => {
  for (const [path, expected] of Object.entries(matrix)) {
    for (const role of who) {
      it(`${role} opening ${path} gets ${expected[role]}`, async () => {
        const res = await get(path, role === "visitor" ? undefined : users[role]!.cookie);
        expect(res.status).toBe(expected[role]);
        if (expected[role] === 302) {
          expect(res.headers.get("location")).toBe(`/sign-in?redirectTo=${encodeURIComponent(path)}`);
        }
        if (expected[role] === 403) {
          expect(await res.text()).toContain("This area is not open to your account");
        }
      });
    }
  }
});

describe("navigation by role", () => {
  const expectedNav: Record<Who, string[]> = {
    visitor: ["Library"],
    contributor: ["Library", "Workspace"],
    curator: ["Library", "Workspace", "Review"],
    admin: ["Library", "Workspace", "Review", "Admin"],
  };
  for (const role of who) {
    it(`${role} sees ${expectedNav[role].join(", ")}`, async () => {
      const html = await (await get("/", role === "visitor" ? undefined : users[role]!.cookie)).text();
      const nav = html.match(/<nav aria-label="Main"[\s\S]*?<\/nav>/)?.[0] ?? "";
      const labels = [...nav.matchAll(/<a [^>]*>([^<]+)<\/a>/g)].map((m) => m[1]);
      expect(labels).toEqual(expectedNav[role]);
    });
  }
});
