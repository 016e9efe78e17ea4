import { expect, test, type BrowserContext, type Page } from "@playwright/test";

const shots = `${process.env.ERGOSHELF_DATA_DIR ?? ".data"}/test-results/screens`;
const SOURCE = { slug: "buoy-k05-sea-state-hourly", edition: 1 };

// console.error in the page is a failure unless a test expects it.
test.beforeEach(async ({ page }) => {
  const errors: string[] = [];
  page.on("console", (msg) => {
    if (msg.type() === "error") errors.push(msg.text());
  });
  page.on("pageerror", (err) => errors.push(err.message));
  (page as Page & { consoleErrors?: string[] }).consoleErrors = errors;
});

// Items this file created; removed after each test through the item page's own delete action.
const created: string[] = [];
test.afterEach(async ({ page }, info) => {
  for (const id of created.splice(0)) {
    const res = await page.request.post(`/workspace/${id}`, { form: { intent: "delete", confirm: "yes" }, maxRedirects: 0 });
    expect([302, 404]).toContain(res.status());
  }
  const errors = (page as Page & { consoleErrors?: string[] }).consoleErrors ?? [];
  // A refused save answers 409 and the browser logs that status; a 5xx never passes.
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

function itemId(page: Page): string {
  const m = /\/workspace\/([0-9a-f-]{36})$/.exec(page.url());
  if (!m) throw new Error(`not on an item page: ${page.url()}`);
  return m[1];
}

async function cloneSource(page: Page, title: string): Promise<string> {
  await page.goto(`/workspace/new?slug=${SOURCE.slug}&edition=${SOURCE.edition}`);
  await page.getByLabel("Title of your copy").fill(title);
  await page.getByRole("button", { name: "Copy to my workspace" }).click();
  await page.waitForURL(/\/workspace\/[0-9a-f-]{36}$/);
  const id = itemId(page);
  created.push(id);
  await openItem(page, `/workspace/${id}`);
  return id;
}

/** The parameters the editor would save (the form's hidden field). */
async function formParams(page: Page): Promise<unknown> {
  return JSON.parse(await page.locator('input[type="hidden"][name="params"]').inputValue()) as unknown;
}

/** The server's entropy rate for `model`, as the preview prints it (6 decimals, bits). */
async function serverRate(context: BrowserContext | Page, model: unknown): Promise<string> {
  const res = await context.request.post("/api/v1/compute", { data: { model } });
  expect(res.status()).toBe(200);
  return ((await res.json()) as { entropyRate: { bits: number } }).entropyRate.bits.toFixed(6);
}

const cell = (page: Page, name: string) => page.getByRole("textbox", { name, exact: true });
const previewRate = (page: Page) => page.getByTestId("preview-entropy-rate");

/** Opens (or reloads) an item page and waits until it is live: the preview only runs once the page has hydrated. */
async function openItem(page: Page, path?: string) {
  if (path) await page.goto(path);
  else await page.reload();
  await expect(previewRate(page)).toHaveText(/^\d+\.\d{6}$/);
}

test("a contributor clones an edition, edits a cell, sees the preview change before saving, saves and restores", async ({ page }) => {
  await signIn(page, "contributor@example.org");
  const title = `Sea state refit ${Date.now()}`;
  await cloneSource(page, title);

  await expect(page.getByRole("heading", { level: 1 })).toHaveText(title);
  await expect(page.getByTestId("revision")).toHaveText("revision 1");
  const source = page.getByTestId("item-source");
  await expect(source).toContainText(`ergoshelf:${SOURCE.slug}@${SOURCE.edition}`);
  await expect(source.getByRole("link", { name: `edition ${SOURCE.edition}` })).toHaveAttribute("href", `/library/${SOURCE.slug}/e/${SOURCE.edition}`);
  await expect(page.getByRole("link", { name: "Submit for review" })).toHaveAttribute("href", `/workspace/${itemId(page)}/submit`);

  // The browser's preview of the clone is the server's figure for the edition's parameters.
  const original = await formParams(page);
  const before = await serverRate(page, original);
  await expect(previewRate(page)).toHaveText(before);
  // Where min-entropy is shown, so is the caution that a model estimate is not a source validation.
  await expect(page.getByRole("region", { name: "Live preview" })).toContainText("does not replace validation of a physical entropy source");

  // Move 0.06 of the first row from staying to the next state: the row still sums to 1.
  const stay = cell(page, "P(calm → calm)");
  const move = cell(page, "P(calm → swell)");
  const stayBefore = await stay.inputValue();
  await stay.fill(String(Number((Number(stayBefore) - 0.06).toFixed(4))));
  await expect(page.getByTestId("P-rowsum-0")).toContainText("not 1");
  await expect(page.locator("#P-row-0-error")).toContainText("Row calm: row 0 (\"calm\") sums to");
  await move.fill(String(Number((Number(await move.inputValue()) + 0.06).toFixed(4))));
  await expect(page.getByTestId("P-rowsum-0")).toHaveText("✓ 1");

  // Before any save: the figure has moved, to the server's figure for the edited matrix.
  const edited = await formParams(page);
  const after = await serverRate(page, edited);
  expect(after).not.toBe(before);
  await expect(previewRate(page)).toHaveText(after);
  await expect(page.getByTestId("revision")).toHaveText("revision 1");
  await expect(page.getByTestId("save-status")).toHaveText("Unsaved changes.");
  await page.screenshot({ path: `${shots}/workspace-edited.png`, fullPage: true });

  await page.getByRole("button", { name: "Save as revision 2" }).click();
  await expect(page.getByTestId("save-status")).toHaveText("Saved as revision 2.");
  await expect(page.getByTestId("revision")).toHaveText("revision 2");
  await expect(page.getByTestId("saved-figures")).toContainText(`entropy rate ${after}`);
  await expect(page.getByTestId("saved-figures")).toContainText("verified by two routes");

  await openItem(page);
  await expect(stay).toHaveValue(String(Number((Number(stayBefore) - 0.06).toFixed(4))));
  await page.getByRole("button", { name: "Restore revision 1" }).click();
  await expect(page.getByTestId("revision")).toHaveText("revision 3");
  await expect(stay).toHaveValue(stayBefore);
  await expect(previewRate(page)).toHaveText(before);
  await expect(page.getByTestId("revision-3")).toContainText("(current)");

  await page.setViewportSize({ width: 360, height: 780 });
  await page.screenshot({ path: `${shots}/workspace-item-360.png`, fullPage: true });
});

test("a save from a stale tab is refused with a clear message and the edits stay in the form", async ({ page, context }) => {
  await signIn(page, "contributor@example.org");
  const id = await cloneSource(page, `Stale tab check ${Date.now()}`);
  const other = await context.newPage();
  await openItem(other, `/workspace/${id}`);

  // The second tab saves first.
  await cell(other, "P(rough → rough)").fill("0.7");
  await cell(other, "P(rough → storm)").fill("0.12");
  await other.getByRole("button", { name: "Save as revision 2" }).click();
  await expect(other.getByTestId("save-status")).toHaveText("Saved as revision 2.");

  // This tab still works from revision 1.
  await cell(page, "P(swell → swell)").fill("0.75");
  await cell(page, "P(swell → rough)").fill("0.15");
  await page.getByRole("button", { name: "Save as revision 2" }).click();
  const notice = page.getByTestId("stale-notice");
  await expect(notice).toContainText("Not saved: this item was saved elsewhere (revision 2) after you opened revision 1.");
  await expect(notice).toContainText("your edits are still in this form");
  await expect(cell(page, "P(swell → swell)")).toHaveValue("0.75");
  await expect(cell(page, "P(swell → rough)")).toHaveValue("0.15");
  await expect(page.getByRole("button", { name: "Save as revision 2" })).toBeDisabled();
  await page.screenshot({ path: `${shots}/workspace-stale.png`, fullPage: true });

  // Nothing of the other tab's save was overwritten.
  await openItem(other);
  await expect(other.getByTestId("revision")).toHaveText("revision 2");
  await expect(cell(other, "P(rough → storm)")).toHaveValue("0.12");
  await expect(cell(other, "P(swell → swell)")).not.toHaveValue("0.75");

  // The user chooses to save on top; revision 2 stays in the history.
  await page.getByRole("button", { name: "Save mine as revision 3" }).click();
  await expect(page.getByTestId("save-status")).toHaveText("Saved as revision 3.");
  await expect(notice).toHaveCount(0);
  await expect(page.getByTestId("revision-2")).toBeVisible();
  await other.close();
});

/** Entropy rate (bits) of a random walk on an undirected weighted graph without self-loops:
 *  H(w_e / 2W over both directions of each edge) − H(w_i / 2W over nodes) (the closed form DESIGN.md names). */
function walkRateBits(edges: [string, string, number][]): number {
  const W = edges.reduce((s, e) => s + e[2], 0);
  const node = new Map<string, number>();
  for (const [u, v, w] of edges) {
    node.set(u, (node.get(u) ?? 0) + w);
    node.set(v, (node.get(v) ?? 0) + w);
  }
  const h = (ps: number[]) => -ps.filter((p) => p > 0).reduce((s, p) => s + p * Math.log2(p), 0);
  return h(edges.flatMap((e) => [e[2] / (2 * W), e[2] / (2 * W)])) - h([...node.values()].map((w) => w / (2 * W)));
}

test("a new graph-walk item takes its edges from CSV", async ({ page }) => {
  await signIn(page, "contributor@example.org");
  await page.goto("/workspace/new");
  await page.getByLabel("Family").selectOption("graph-walk");
  const title = `Cold store walk ${Date.now()}`;
  await page.getByLabel("Title").fill(title);
  await page.getByRole("button", { name: "Create item" }).click();
  await page.waitForURL(/\/workspace\/[0-9a-f-]{36}$/);
  created.push(itemId(page));
  await openItem(page);
  await expect(page.getByTestId("item-source")).toContainText("not cloned");

  const start = (await formParams(page)) as { nodes: string[]; edges: [string, string, number][] };
  await page.getByText("Import edges from CSV").click();
  const box = page.getByLabel(/One edge per line/);
  await box.fill("u,v,w\ndock;freezer-door;2\nfreezer-door aisle-2\n");
  await page.getByRole("button", { name: "Add these edges" }).click();
  await expect(page.getByRole("alert").filter({ hasText: "line 3" })).toContainText('expected "u,v,w"');
  expect(((await formParams(page)) as { edges: unknown[] }).edges).toHaveLength(start.edges.length);

  await box.fill("u,v,w\ndock;freezer-door;2\nfreezer-door,aisle-2,0.5\n");
  await page.getByRole("button", { name: "Add these edges" }).click();
  const params = (await formParams(page)) as { nodes: string[]; edges: [string, string, number][] };
  expect(params.nodes).toEqual([...start.nodes, "freezer-door"]);
  expect(params.edges.slice(-2)).toEqual([
    ["dock", "freezer-door", 2],
    ["freezer-door", "aisle-2", 0.5],
  ]);
  const expected = walkRateBits(params.edges).toFixed(6);
  await expect(previewRate(page)).toHaveText(expected);
  expect(await serverRate(page, params)).toBe(expected);
  await expect(page.getByTestId("sweep-chart")).toBeVisible();

  await page.getByRole("button", { name: "Save as revision 2" }).click();
  await expect(page.getByTestId("save-status")).toHaveText("Saved as revision 2.");
  await openItem(page);
  await expect(page.getByLabel("Edge 5, weight")).toHaveValue("0.5");
  await page.screenshot({ path: `${shots}/workspace-graph-walk.png`, fullPage: true });

  // Deleting from the page takes it off the list.
  await page.getByRole("button", { name: "Delete…" }).click();
  await page.getByLabel(/Yes, delete/).check();
  await page.getByRole("button", { name: "Delete item" }).click();
  await page.waitForURL(/\/workspace$/);
  await expect(page.getByRole("link", { name: title })).toHaveCount(0);
});
