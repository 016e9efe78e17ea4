/** Seeds the demo accounts, the library from catalog/ and one open demo proposal. Idempotent. */
import { fileURLToPath } from "node:url";
import { CatalogError, seedCatalog } from "../app/.server/catalog.server";
import { seedDemoProposal } from "../app/.server/demo-proposal.server";
import { seedDemoUsers } from "../app/.server/demo-users.server";

const catalogDir = fileURLToPath(new URL("../catalog", import.meta.url));
try {
  const users = await seedDemoUsers();
  const started = Date.now();
  const result = await seedCatalog(catalogDir);
  const proposal = await seedDemoProposal();
  console.log(
    `[seed] ${users} demo accounts added; catalogue of ${result.models} models verified in ${Date.now() - started} ms` +
      ` (${result.addedModels} new models, ${result.addedEditions} new editions)` +
      (proposal ? "; demo proposal submitted for review" : ""),
  );
  process.exit(0);
} catch (error) {
  if (error instanceof CatalogError) {
    console.error(`[seed] refused catalogue file ${error.file}: ${error.reason}`);
    process.exit(3);
  }
  console.error("[seed] failed:", error);
  process.exit(1);
}
