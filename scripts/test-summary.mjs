// Prints one line per suite and the closing "N passed, N failed" line; exits non-zero on any failure.
import { existsSync, readFileSync } from "node:fs";
import path from "node:path";

const [dir, failedSteps = "", seconds = "?"] = process.argv.slice(2);
const read = (name) => {
  const file = path.join(dir, name);
  return existsSync(file) ? JSON.parse(readFileSync(file, "utf8")) : null;
};
const suites = [];
for (const [label, file] of [["unit + reference", "vitest-pure.json"], ["integration", "vitest-integration.json"]]) {
  const r = read(file);
  if (!r) { suites.push({ label, passed: 0, failed: 1, skipped: 0, missing: true }); continue; }
  const byProject = {};
  for (const f of r.testResults ?? []) {
    for (const t of f.assertionResults ?? []) {
      const project = f.name.includes("/tests/reference/") ? "reference" : f.name.includes("/tests/integration/") ? "integration" : "unit";
      byProject[project] ??= { passed: 0, failed: 0, skipped: 0 };
      if (t.status === "passed") byProject[project].passed++;
      else if (t.status === "failed") byProject[project].failed++;
      else byProject[project].skipped++;
    }
  }
  for (const [project, c] of Object.entries(byProject)) suites.push({ label: project, ...c });
  if (r.numFailedTestSuites > 0 && !Object.values(byProject).some((c) => c.failed)) suites.push({ label: `${label} (files that failed to load)`, passed: 0, failed: r.numFailedTestSuites, skipped: 0 });
}
const e2e = read("playwright.json");
if (e2e) suites.push({ label: "end-to-end", passed: e2e.stats.expected + (e2e.stats.flaky ?? 0), failed: e2e.stats.unexpected, skipped: e2e.stats.skipped });
else suites.push({ label: "end-to-end", passed: 0, failed: 1, skipped: 0, missing: true });

let passed = 0, failed = 0, skipped = 0;
console.log("\n── summary");
for (const s of suites) {
  passed += s.passed; failed += s.failed; skipped += s.skipped;
  console.log(`  ${s.label.padEnd(20)} ${String(s.passed).padStart(5)} passed  ${String(s.failed).padStart(3)} failed${s.skipped ? `  ${s.skipped} skipped` : ""}${s.missing ? "  (no results: the suite did not run)" : ""}`);
}
const steps = failedSteps.trim();
if (steps) console.log(`  failed steps: ${steps}`);
console.log(`  time: ${seconds} s`);
const bad = failed > 0 || skipped > 0 || steps !== "";
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(bad ? 1 : 0);
