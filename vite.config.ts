import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vite";

export default defineConfig({
  plugins: [tailwindcss(), reactRouter()],
  resolve: { tsconfigPaths: true },
  optimizeDeps: {
    include: ["react", "react-dom", "react-router", "@tanstack/react-table", "zod", "minisearch"],
    exclude: ["pg", "drizzle-orm"],
  },
  server: { host: "127.0.0.1" },
  // Several dev servers of one checkout can run side by side, each with its own optimiser cache.
  cacheDir: process.env.VITE_CACHE_DIR ?? "node_modules/.vite",
});
