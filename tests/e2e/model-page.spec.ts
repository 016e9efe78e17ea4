import { readFileSync } from "node:fs";
import { expect, test, type Page } from "@playwright/test";

// console.error in the page is a failure unless a test expects it (4xx responses a test asks for are expected).
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
  const unexpected = errors.filter((e) => !/Failed to load resource: the server responded with a status of 4\d\d/.test(e));
  if (info.expectedStatus === "passed") expect(unexpected, "console errors").toEqual([]);
});

/** The seeded catalogue is the source of the demo database: edition n's parameters, as published. */
function catalogParams(slug: string, edition: number): unknown {
  const file = JSON.parse(readFileSync(new URL(`../../catalog/${slug}.json`, import.meta.url), "utf8")) as { editions: { params: unknown }[] };
  return file.editions[edition - 1].params;
}

const K07 = "/library/buoy-k07-uplink-burst";

test("a visitor reads the entropy rate, compares editions 1 and 3 and downloads the BibTeX", async ({ page, request }) => {
  await page.goto(K07);
  await expect(page).toHaveTitle("Buoy K07 uplink: burst errors · edition 3 · Ergoshelf");
  const strip = page.getByTestId("key-figures");
  const shown = (await strip.getByTestId("entropy-rate").textContent())!.trim();
  await expect(strip.getByTestId("entropy-rate-unit")).toHaveText("bits/symbol");

  // The figure on the page is the one the public compute API gives for edition 3's parameters.
  const res = await request.post("/api/v1/compute", { data: { model: catalogParams("buoy-k07-uplink-burst", 3) } });
  expect(res.status()).toBe(200);
  const computed = (await res.json()) as { entropyRate: { bits: number } };
  expect(shown).toBe(computed.entropyRate.bits.toFixed(6));

  // Edition 1 through the history table's permanent link.
  await page.getByRole("table", { name: /Editions of this model/ }).getByRole("link", { name: /^1/ }).click();
  await expect(page).toHaveURL(/\/library\/buoy-k07-uplink-burst\/e\/1$/);
  await expect(page.getByText("Superseded by")).toContainText("edition 3");

  await page.getByLabel("Compare edition").selectOption("1");
  await page.getByLabel("with edition").selectOption("3");
  await page.getByRole("button", { name: "Compare" }).click();
  await expect(page).toHaveURL(/from=1&to=3/);
  const changes = page.getByTestId("param-changes");
  await expect(changes).toContainText("a = P(good → bad)");
  await expect(changes).toContainText("0.0094 → 0.0084");
  await expect(changes).toContainText("0.262 → 0.274");
  await expect(page.getByTestId("figure-changes")).toContainText("Entropy rate");

  // The citation file of the edition shown (1) names its citation key.
  await expect(page.getByTestId("citation-key")).toHaveText("ergoshelf:buoy-k07-uplink-burst@1");
  const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("link", { name: "BibTeX" }).click()]);
  const path = await download.path();
  const bib = readFileSync(path, "utf8");
  expect(bib).toContain("@misc{");
  expect(bib).toContain("ergoshelf:buoy-k07-uplink-burst@1");
});

test("the diff also works without JavaScript", async ({ browser }) => {
  const context = await browser.newContext({ javaScriptEnabled: false });
  const page = await context.newPage();
  await page.goto(`${K07}/e/3`);
  await page.getByLabel("Compare edition").selectOption("1");
  await page.getByLabel("with edition").selectOption("3");
  await page.getByRole("button", { name: "Compare" }).click();
  await expect(page.getByTestId("param-changes")).toContainText("b = P(bad → good)");
  await context.close();
});

test("a retracted edition still resolves, with a banner that names the reason and the current edition", async ({ page }) => {
  await page.goto("/library/ro-bits-order3/e/2");
  const banner = page.getByRole("note").filter({ hasText: "was retracted" });
  await expect(banner).toContainText("Edition 2 was retracted on 2026-06-02");
  await expect(banner).toContainText("capture FIFO overran");
  await banner.getByRole("link", { name: "Go to the current edition (3)" }).click();
  await expect(page).toHaveURL(/\/library\/ro-bits-order3\/e\/3$/);
  await expect(page.getByRole("note").filter({ hasText: "was retracted" })).toHaveCount(0);
});

test("the units toggle switches the strip to nats, and the choice survives a reload", async ({ page, request }) => {
  await page.goto(K07);
  const res = await request.post("/api/v1/compute", { data: { model: catalogParams("buoy-k07-uplink-burst", 3) } });
  const nats = ((await res.json()) as { entropyRate: { nats: number } }).entropyRate.nats.toFixed(6);
  // The toggle is a client control: wait until the page is hydrated before pressing it.
  await page.waitForLoadState("networkidle");
  await page.getByRole("group", { name: "Units" }).getByRole("button", { name: "nats" }).click();
  const strip = page.getByTestId("key-figures");
  await expect(strip.getByTestId("entropy-rate-unit")).toHaveText("nats/symbol");
  await expect(strip.getByTestId("entropy-rate")).toHaveText(nats);
  await expect(page.getByRole("button", { name: "nats" })).toHaveAttribute("aria-pressed", "true");
  await page.reload();
  await expect(strip.getByTestId("entropy-rate-unit")).toHaveText("nats/symbol");
  await expect(strip.getByTestId("entropy-rate")).toHaveText(nats);
});

test("bad addresses get 404 or 400 with a clear message", async ({ page }) => {
  const unknownModel = await page.goto("/library/no-such-model-here");
  expect(unknownModel!.status()).toBe(404);
  await expect(page.getByText("There is no model “no-such-model-here” in the library.")).toBeVisible();

  const unknownEdition = await page.goto(`${K07}/e/9`);
  expect(unknownEdition!.status()).toBe(404);
  await expect(page.getByText("has no edition 9")).toBeVisible();
  await expect(page.getByRole("link", { name: "Go to Buoy K07 uplink: burst errors" })).toHaveAttribute("href", K07);

  const notANumber = await page.goto(`${K07}/e/first`);
  expect(notANumber!.status()).toBe(400);
  await expect(page.getByText("is not an edition number")).toBeVisible();
});

// One model of each family (and the larger shapes), looked at on a desktop and on a phone.
const families = [
  ["two-state", K07],
  ["markov-order2", "/library/harbour-light-code-order2"],
  ["markov-24", "/library/tide-surge-residual-24"],
  ["iid", "/library/ro-raw-bits-bench"],
  ["graph-walk", "/library/dunlin-floor-walk"],
  ["hidden", "/library/tide-gauge-sticking-float"],
] as const;

for (const [name, path] of families) {
  test(`the ${name} model page renders its figures, parameters and citation`, async ({ page }) => {
    await page.setViewportSize({ width: 1280, height: 900 });
    const res = await page.goto(path);
    expect(res!.status()).toBe(200);
    await expect(page.getByRole("heading", { level: 1 })).toBeVisible();
    await expect(page.getByTestId("entropy-rate")).toHaveText(/^\d+\.\d{6}$/);
    await expect(page.getByRole("heading", { name: "Parameters", level: 2 })).toBeVisible();
    await expect(page.getByTestId("citation-key")).toHaveText(/^ergoshelf:[a-z0-9-]+@\d+$/);
    await expect(page.getByText(/Verified: /).first()).toBeVisible();
    if (name === "hidden") await expect(page.getByRole("heading", { name: "Hidden-source bounds" })).toBeVisible();
    if (name === "markov-24") await expect(page.getByText("a drawing above", { exact: false })).toBeVisible();
    if (name === "graph-walk") await expect(page.locator(".mp-diagram svg")).toBeVisible();
    await page.waitForLoadState("networkidle");
    await page.screenshot({ path: `/tmp/model-${name}.png`, fullPage: true });
    if (name === "two-state") {
      await page.setViewportSize({ width: 360, height: 780 });
      // Nothing but the scroll boxes may be wider than the phone (charts follow their box after a resize, so poll).
      await expect.poll(() => page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(360);
      await page.screenshot({ path: `/tmp/model-${name}-360.png`, fullPage: true });
    }
  });
}
