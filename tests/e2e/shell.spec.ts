import { expect, test, type Page } from "@playwright/test";

const shots = `${process.env.ERGOSHELF_DATA_DIR ?? ".data"}/test-results/screens`;

// console.error in the page is a failure unless a test expects it.
test.beforeEach(async ({ page }) => {
  const errors: string[] = [];
  page.on("console", (msg) => {
    if (msg.type() === "error") errors.push(msg.text());
  });
  page.on("pageerror", (err) => errors.push(err.message));
  (page as Page & { consoleErrors?: string[] }).consoleErrors = errors;
});
test.afterEach(async ({ page }, info) => {
  const errors = (page as Page & { consoleErrors?: string[] }).consoleErrors ?? [];
  // A page served with an expected 4xx status (403, 404, a refused sign-in) logs its status; a 5xx never passes.
  const unexpected = errors.filter((e) => !/Failed to load resource: the server responded with a status of 4\d\d/.test(e));
  if (info.expectedStatus === "passed") expect(unexpected, "console errors").toEqual([]);
});

async function signIn(page: Page, email: string) {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password").fill("ergoshelf-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL("**/library");
}

test("the front page leads with the job and the library's figures", async ({ page }) => {
  await page.goto("/");
  await expect(page.getByRole("heading", { level: 1 })).toContainText("bits per symbol");
  await expect(page.getByRole("navigation", { name: "Main" }).getByRole("link")).toHaveText(["Library"]);
  await expect(page.getByText("Recently updated")).toBeVisible();
  await page.screenshot({ path: `${shots}/home.png`, fullPage: true });
  await page.setViewportSize({ width: 360, height: 780 });
  await page.screenshot({ path: `${shots}/home-360.png`, fullPage: true });
});

for (const [email, nav] of [
  ["contributor@example.org", ["Library", "Workspace"]],
  ["curator@example.org", ["Library", "Workspace", "Review"]],
  ["admin@example.org", ["Library", "Workspace", "Review", "Admin"]],
] as const) {
  test(`${email} signs in, sees their navigation and signs out`, async ({ page }) => {
    await signIn(page, email);
    await expect(page.getByRole("navigation", { name: "Main" }).getByRole("link")).toHaveText([...nav]);
    await page.getByRole("button", { name: "Sign out" }).click();
    await expect(page.getByRole("link", { name: "Sign in" })).toBeVisible();
    await expect(page.getByRole("navigation", { name: "Main" }).getByRole("link")).toHaveText(["Library"]);
  });
}

test("a wrong password is refused with a message that names neither part", async ({ page }) => {
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").fill("curator@example.org");
  await page.getByLabel("Password").fill("wrong");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page.getByRole("alert")).toContainText("do not match an account");
  await expect(page.getByLabel("Password")).toHaveAttribute("aria-invalid", "true");
  await page.screenshot({ path: `${shots}/sign-in-error.png`, fullPage: true });
});

test("a visitor opening the workspace signs in and lands back there", async ({ page }) => {
  await page.goto("/workspace");
  await expect(page).toHaveURL(/\/sign-in\?redirectTo=%2Fworkspace/);
  await expect(page.getByRole("status")).toContainText("/workspace");
  await page.screenshot({ path: `${shots}/sign-in.png`, fullPage: true });
  await page.getByLabel("E-mail address").fill("contributor@example.org");
  await page.getByLabel("Password").fill("ergoshelf-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await expect(page).toHaveURL(/\/workspace$/);
  await expect(page.getByRole("heading", { level: 1 })).toHaveText("Workspace");
});

test("a contributor opening the admin area gets a 403 page that helps", async ({ page }) => {
  await signIn(page, "contributor@example.org");
  const res = await page.goto("/admin");
  expect(res?.status()).toBe(403);
  await expect(page.getByRole("heading", { level: 1 })).toHaveText("This area is not open to your account");
});

test("an unknown address shows a 404 page with a way back", async ({ page }) => {
  const res = await page.goto("/library-of-nothing");
  expect(res?.status()).toBe(404);
  await expect(page.getByRole("heading", { level: 1 })).toHaveText("We could not find that page");
  await expect(page.getByRole("link", { name: "Browse the library" })).toBeVisible();
  await page.screenshot({ path: `${shots}/not-found.png`, fullPage: true });
});

test("every control on the sign-in page is reachable by keyboard", async ({ page }) => {
  await page.goto("/sign-in");
  const reached: string[] = [];
  for (let i = 0; i < 12; i++) {
    await page.keyboard.press("Tab");
    reached.push(await page.evaluate(() => document.activeElement?.getAttribute("id") || document.activeElement?.textContent?.trim() || ""));
  }
  expect(reached).toContain("email");
  expect(reached).toContain("password");
  expect(reached.some((r) => r === "Sign in")).toBe(true);
});
