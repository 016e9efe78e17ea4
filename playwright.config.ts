import { defineConfig } from "@playwright/test";

// Drives Debian's Chromium (no browser download) against the built server that scripts/test.sh starts.
export default defineConfig({
  testDir: "tests/e2e",
  fullyParallel: false,
  workers: 2,
  forbidOnly: true,
  retries: 0,
  timeout: 30_000,
  reporter: [["list"], ["json", { outputFile: `${process.env.ERGOSHELF_DATA_DIR ?? ".data"}/test-results/playwright.json` }]],
  outputDir: `${process.env.ERGOSHELF_DATA_DIR ?? ".data"}/test-results/playwright-artifacts`,
  use: {
    baseURL: process.env.ERGOSHELF_TEST_BASE_URL ?? "http://127.0.0.1:39339",
    trace: "off",
    screenshot: "only-on-failure",
    launchOptions: {
      executablePath: "/usr/bin/chromium",
      args: [
        "--no-sandbox",
        "--disable-gpu",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
        "--no-first-run",
        "--disable-quic",
      ],
    },
  },
});
