import { expect, test } from "@playwright/test";

// A visitor finds a model by a word from its summary, narrows by family, and opens it.
test("search as you type, filter by family, open the model", async ({ page }) => {
  const errors: string[] = [];
  page.on("pageerror", (e) => errors.push(e.message));
  await page.goto("/library");
  const box = page.getByLabel("Search the library");
  // "antenna" appears only in the summary of the K03 uplink model (catalog/buoy-k03-uplink-burst.json).
  const answer = page.waitForResponse((r) => r.url().includes("/api/v1/search") && r.url().includes("q=antenna"));
  await box.fill("antenna");
  await answer;
  const table = page.getByRole("table");
  await expect(table.getByRole("link").first()).toHaveText("Buoy K03 uplink: burst errors (exposed site)");
  await expect(page).toHaveURL(/\/library\?q=antenna/);

  await page.getByLabel("Two-state chain").check();
  await expect(page).toHaveURL(/family=two-state/);
  await expect(table.getByRole("link")).toHaveCount(1);

  await page.getByLabel("Hidden Markov source").check();
  await page.getByLabel("Two-state chain").uncheck();
  await expect(page.getByRole("status").first()).toContainText("No model matches");

  await page.getByLabel("Hidden Markov source").uncheck();
  await page.getByLabel("Two-state chain").check();
  await table.getByRole("link", { name: /Buoy K03/ }).click();
  await expect(page).toHaveURL(/\/library\/buoy-k03-uplink-burst$/);
  await expect(page.getByTestId("key-figures").getByTestId("entropy-rate")).toHaveText(/^\d\.\d{6}$/);
  expect(errors).toEqual([]);
});

test("the search is shareable: the URL's query renders on the server without JavaScript", async ({ browser }) => {
  const context = await browser.newContext({ javaScriptEnabled: false });
  const page = await context.newPage();
  await page.goto("/library?q=robot&family=graph-walk");
  const links = page.getByRole("table").getByRole("link");
  await expect(links.first()).toBeVisible();
  for (const text of await links.allTextContents()) expect(text).toMatch(/./);
  await expect(page.getByLabel("Random walk on a weighted graph")).toBeChecked();
  await context.close();
});
