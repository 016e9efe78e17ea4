// The whole review path in Chromium: a contributor adjusts a copy of a library edition and proposes
// it as a new edition; a curator reads the mail, asks for changes; the contributor resubmits; the
// curator accepts; the library then shows the new edition, and the old one still resolves.
import { expect, test, type Browser, type Page } from "@playwright/test";

const shots = `${process.env.ERGOSHELF_DATA_DIR ?? ".data"}/test-results/screens`;
// A model no other end-to-end test reads, so the edition this test publishes surprises nobody.
const SLUG = "dunlin-task-log";
const TITLE = "Warehouse robot Dunlin: task state log";

async function signedIn(browser: Browser, email: string): Promise<Page> {
  const context = await browser.newContext();
  const page = await context.newPage();
  const errors: string[] = [];
  page.on("console", (msg) => {
    if (msg.type() === "error") errors.push(msg.text());
  });
  page.on("pageerror", (err) => errors.push(err.message));
  (page as Page & { consoleErrors?: string[] }).consoleErrors = errors;
  await page.goto("/sign-in");
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password").fill("ergoshelf-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL("**/library");
  return page;
}

const cell = (page: Page, name: string) => page.getByRole("textbox", { name, exact: true });
const previewRate = (page: Page) => page.getByTestId("preview-entropy-rate");

async function serverRate(page: Page, model: unknown): Promise<number> {
  const res = await page.request.post("/api/v1/compute", { data: { model } });
  expect(res.status()).toBe(200);
  return ((await res.json()) as { entropyRate: { bits: number } }).entropyRate.bits;
}

async function formParams(page: Page): Promise<unknown> {
  return JSON.parse(await page.locator('input[type="hidden"][name="params"]').inputValue()) as unknown;
}

async function latestEdition(page: Page): Promise<number> {
  const res = await page.request.get(`/api/v1/models/${SLUG}`);
  expect(res.status()).toBe(200);
  const body = (await res.json()) as { editions: { number: number }[] };
  return Math.max(...body.editions.map((e) => e.number));
}

test("propose a new edition, get changes requested, resubmit, and see it published", async ({ browser }) => {
  test.setTimeout(120_000);
  const author = await signedIn(browser, "contributor@example.org");
  const curator = await signedIn(browser, "curator@example.org");
  const before = await latestEdition(author);
  const next = before + 1;

  // Adjust a copy from the model page.
  await author.goto(`/library/${SLUG}`);
  await author.getByTestId("adjust-copy").click();
  await author.getByLabel("Title of your copy").fill(`Dunlin task log refit ${Date.now()}`);
  await author.getByRole("button", { name: "Copy to my workspace" }).click();
  await author.waitForURL(/\/workspace\/[0-9a-f-]{36}$/);
  const itemPath = new URL(author.url()).pathname;
  await expect(previewRate(author)).toHaveText(/^\d+\.\d{6}$/);
  const shownBefore = await previewRate(author).textContent();

  // Move 0.02 of idle's probability from staying idle to picking: the row still sums to 1.
  await cell(author, "P(idle → idle)").fill("0.4");
  await cell(author, "P(idle → pick)").fill("0.5");
  await expect(author.getByTestId("P-rowsum-0")).toHaveText("✓ 1");
  const edited = await formParams(author);
  const editedRate = (await serverRate(author, edited)).toFixed(6);
  expect(editedRate).not.toBe(shownBefore);
  // The preview shows the new figure before anything is saved.
  await expect(previewRate(author)).toHaveText(editedRate);
  await expect(author.getByTestId("save-status")).toHaveText("Unsaved changes.");
  await author.getByRole("button", { name: "Save as revision 2" }).click();
  await expect(author.getByTestId("save-status")).toHaveText("Saved as revision 2.");

  // Submit it as a new edition of the model it came from.
  await author.getByRole("link", { name: "Submit for review" }).click();
  await expect(author.getByRole("radio", { name: /A new edition/ })).toBeChecked();
  await author.getByLabel("Change note for the curators").fill("Idle robots now pick sooner after the new dispatch rule.");
  await author.getByRole("button", { name: "Submit revision 2" }).click();
  await author.waitForURL(/\/workspace\/proposals\/[0-9a-f-]{36}$/);
  const proposalId = author.url().split("/").pop()!;
  await expect(author.getByTestId("proposal-state")).toHaveText(/Submitted/);

  // The curator is told by mail, and follows its link.
  await curator.goto("/dev/mail");
  const subject = `Proposal submitted: ${TITLE}`;
  await curator.getByRole("navigation", { name: "Messages" }).getByRole("link", { name: new RegExp(subject) }).first().click();
  const reviewLink = curator.getByRole("link", { name: new RegExp(`/review/${proposalId}$`) }).first();
  await expect(reviewLink).toBeVisible();
  await curator.goto(new URL(await reviewLink.getAttribute("href") as string).pathname);
  await expect(curator.getByTestId("proposal-param-changes")).toContainText("P[idle → idle]");
  await expect(curator.getByTestId("verification-summary")).toContainText("checks passed");
  await curator.getByRole("radio", { name: /Ask for changes/ }).check();
  await curator.getByLabel("Note for the author").fill("Please also move a little of idle's charge share to fault, as in the October log.");
  await curator.getByRole("button", { name: "Record decision" }).click();
  await expect(curator.getByTestId("proposal-state")).toHaveText(/Changes requested/);
  await curator.screenshot({ path: `${shots}/review-changes-requested.png`, fullPage: true });

  // The author hears of it by mail too, then edits, saves and resubmits.
  await author.goto("/dev/mail");
  await expect(author.getByRole("navigation", { name: "Messages" })).toContainText(`Changes requested: ${TITLE}`);
  await author.goto(`/workspace/proposals/${proposalId}`);
  await expect(author.getByTestId("changes-requested")).toContainText("as in the October log");
  await author.goto(itemPath);
  await expect(previewRate(author)).toHaveText(editedRate);
  await cell(author, "P(idle → charge)").fill("0.08");
  await cell(author, "P(idle → fault)").fill("0.02");
  await expect(author.getByTestId("P-rowsum-0")).toHaveText("✓ 1");
  const final = await formParams(author);
  const finalRate = await serverRate(author, final);
  await author.getByRole("button", { name: "Save as revision 3" }).click();
  await expect(author.getByTestId("save-status")).toHaveText("Saved as revision 3.");
  await author.goto(`/workspace/proposals/${proposalId}`);
  await author.getByLabel("What you changed").fill("Moved 0.01 from charge to fault for idle robots.");
  await author.getByRole("button", { name: "Resubmit revision 3" }).click();
  await expect(author.getByTestId("proposal-state")).toHaveText(/Resubmitted/);

  // The curator accepts: the next edition is published at once.
  await curator.goto(`/review/${proposalId}`);
  await curator.getByRole("radio", { name: /Accept and publish/ }).check();
  await curator.getByLabel("Note for the author").fill("Thank you; publishing.");
  await curator.getByRole("button", { name: "Record decision" }).click();
  await expect(curator.getByTestId("proposal-state")).toHaveText(/Accepted/);
  await expect(curator.getByTestId("published-notice")).toContainText(`ergoshelf:${SLUG}@${next}`);

  // The library: the new edition with its number, figures and citation key; the old one resolves.
  await curator.goto(`/library/${SLUG}`);
  await expect(curator.getByText(`Edition ${next} of ${next}`)).toBeVisible();
  await expect(curator.getByTestId("key-figures").getByTestId("entropy-rate")).toHaveText(finalRate.toFixed(6));
  await expect(curator.getByTestId("citation-key")).toHaveText(`ergoshelf:${SLUG}@${next}`);
  const api = (await (await curator.request.get(`/api/v1/models/${SLUG}/editions/${next}`)).json()) as { params: unknown };
  expect(api.params).toEqual(final);
  await curator.goto(`/library/${SLUG}/e/${before}`);
  await expect(curator.getByText(`Edition ${before} of ${next}`)).toBeVisible();
  await expect(curator.getByText(`Superseded by`)).toBeVisible();
  await expect(curator.getByTestId("citation-key")).toHaveText(`ergoshelf:${SLUG}@${before}`);

  for (const page of [author, curator]) {
    const errors = (page as Page & { consoleErrors?: string[] }).consoleErrors ?? [];
    expect(errors, "console errors").toEqual([]);
    await page.context().close();
  }
});
