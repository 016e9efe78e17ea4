/**
 * Adds N generated models for scale tests: `npm run seed:synthetic -- 10000`.
 *
 * Each model `synthetic-<k>` (k = 1 … N) is drawn from a generator seeded with k, so a run is
 * reproducible and idempotent: slugs already present are skipped. Every model gets one edition
 * whose figures come from the engine's computeFigures, exactly as published figures do. The
 * models are marked is_synthetic, so the library, its search and its counts never show them;
 * the search benchmark includes them on purpose.
 */
import { execFileSync } from "node:child_process";
import { existsSync, readFileSync } from "node:fs";
import { fileURLToPath, pathToFileURL } from "node:url";
import { inArray } from "drizzle-orm";
import { contentHash } from "../app/.server/catalog.server";
import { closeDb, db } from "../app/.server/db.server";
import { editions, models } from "../app/.server/schema";
import { computeFigures, createRng, ENGINE_VERSION, type ComputeResult, type ModelParams } from "../app/engine";

const HELP = `Usage: npm run seed:synthetic -- N [--batch 500]

Adds N generated models (slugs synthetic-1 … synthetic-N, one edition each, figures computed by
the engine) to the database for scale tests and the search benchmark. Models already present are
skipped, so the command can be re-run or raised to a larger N.

The models are marked synthetic: the library pages, search and counts leave them out.
There is no --remove: published editions cannot be deleted (the database refuses it), so
synthetic models cannot be taken out again either. Use a scratch database (scripts/db.sh reset)
when you want a library without them.`;

const root = fileURLToPath(new URL("..", import.meta.url));

/** Points at the project's own database when the caller did not say otherwise. */
function useLocalDatabase() {
  if (!process.env.DATABASE_URL) {
    process.env.DATABASE_URL = execFileSync("bash", ["scripts/db.sh", "url", "main"], { cwd: root, encoding: "utf8" }).trim();
  }
  if (!process.env.SESSION_SECRET) {
    const file = `${root}.data/session-secret`;
    // The secret signs cookies; this script sets none, but the environment check asks for one.
    process.env.SESSION_SECRET = existsSync(file) ? readFileSync(file, "utf8").trim() : "seed-synthetic-does-not-sign-cookies";
  }
}

interface Args {
  count: number;
  batch: number;
}

function parseArgs(argv: string[]): Args | string {
  if (argv.includes("--help") || argv.includes("-h")) return HELP;
  let count: number | undefined;
  let batch = 500;
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a === "--batch") {
      batch = Number(argv[++i]);
      if (!Number.isInteger(batch) || batch < 1 || batch > 5000) return "--batch must be a whole number from 1 to 5000";
    } else if (/^\d+$/.test(a)) count = Number(a);
    else if (a === "--remove") return "--remove is not possible: editions cannot be deleted. See --help.";
    else return `unknown argument "${a}"; see --help`;
  }
  if (count === undefined) return "say how many models to add, e.g. npm run seed:synthetic -- 10000";
  if (count < 1 || count > 1_000_000) return "N must be from 1 to 1,000,000";
  return { count, batch };
}


// ---------------------------------------------------------------------------------------------
// The generator: small models of every family, named in the Kelpmoor Sound scenario's style.

export interface SyntheticModel {
  slug: string;
  title: string;
  summary: string;
  tags: string[];
  provenance: string;
  methods: string[];
  publishedAt: Date;
  params: ModelParams;
}

const SITES = [
  "buoy K01", "buoy K02", "buoy K03", "buoy K04", "buoy K05", "buoy K06", "buoy K07", "buoy K08",
  "buoy K09", "buoy K10", "buoy K11", "buoy K12", "Brannock Point", "Pier 3", "the cold store",
  "the container yard", "the tide gauge", "the Instrument Lab",
];
const SUBJECTS: Record<ModelParams["family"], string[]> = {
  iid: ["raw bit bias", "ADC noise bits", "packet type mix", "dice-roll calibration", "quantiser noise", "jitter sampler output"],
  "two-state": ["bilge pump duty", "mooring alarm", "uplink frame errors", "lamp on/off log", "door contact log", "relay heartbeat"],
  markov: ["sea-state classes", "surge residual bins", "light code symbols", "wind-sector log", "tide phase log", "uplink burst states"],
  "graph-walk": ["relay mesh walk", "robot waypoint walk", "straddle carrier routes", "inspection crawler path", "patrol circuit"],
  hidden: ["uplink with hidden regime", "sensor with sticking fault", "bit source with thermal drift", "acoustic link fading"],
};
const QUALIFIERS = ["night shift", "winter log", "summer log", "storm week", "calm week", "bench run", "field trial", "recapture", "spring tides", "neap tides"];
const EXTRA_TAGS = ["telemetry", "state log", "entropy source", "burst errors", "sea state", "link", "warehouse robot", "tide gauge", "scale test", "rare events"];
const SYMBOL_SETS = [
  ["calm", "swell", "storm", "gale", "lull", "surge"],
  ["ok", "slow", "lost", "retry", "idle", "busy"],
  ["a", "b", "c", "d", "e", "f"],
  ["n", "ne", "e", "se", "s", "sw"],
];

/** Integer weights out of `total`, each at least 1, as probabilities (4 decimals; they sum to 1 within 1e-12). */
function distribution(next: () => number, size: number, total = 10000): number[] {
  const raw = Array.from({ length: size }, () => 0.05 + next() ** 2);
  const sum = raw.reduce((a, b) => a + b, 0);
  const counts = raw.map((r) => Math.max(1, Math.floor((r / sum) * (total - size))));
  counts[counts.length - 1] += total - counts.reduce((a, b) => a + b, 0);
  return counts.map((c) => c / total);
}

const pick = <T,>(next: () => number, list: readonly T[]): T => list[Math.floor(next() * list.length)];
const between = (next: () => number, lo: number, hi: number) => lo + Math.floor(next() * (hi - lo + 1));

/** The k-th synthetic model: deterministic in k, small enough to compute in a few milliseconds (hidden: about 0.15 s). */
export function generateSyntheticModel(k: number): SyntheticModel {
  const rng = createRng(20_260_000 + k);
  const next = () => rng.next();
  const roll = next();
  const family: ModelParams["family"] = roll < 0.25 ? "iid" : roll < 0.45 ? "two-state" : roll < 0.75 ? "markov" : roll < 0.98 ? "graph-walk" : "hidden";
  const symbols = pick(next, SYMBOL_SETS);
  let params: ModelParams;
  let methods: string[];
  let shape: string;
  switch (family) {
    case "iid": {
      const n = between(next, 2, 6);
      params = { family, alphabet: symbols.slice(0, n), p: distribution(next, n) };
      methods = ["iid-entropy", "min-entropy-karp"];
      shape = `${n} symbols`;
      break;
    }
    case "two-state": {
      const [a, b] = [distribution(next, 2)[0], distribution(next, 2)[0]];
      params = { family, alphabet: symbols.slice(0, 2), a, b };
      methods = ["two-state-closed-form", "entropy-rate-markov", "renyi-rate", "min-entropy-karp"];
      shape = "2 states";
      break;
    }
    case "markov": {
      const order = next() < 0.25 ? 2 : 1;
      const n = order === 2 ? between(next, 2, 3) : between(next, 2, 6);
      const rows = n ** order;
      params = { family, alphabet: symbols.slice(0, n), order, P: Array.from({ length: rows }, () => distribution(next, n)) };
      methods = ["gth-stationary", "entropy-rate-markov", "renyi-rate", "min-entropy-karp"];
      shape = order === 2 ? `order 2 over ${n} symbols (${rows} contexts)` : `${n} states`;
      break;
    }
    case "graph-walk": {
      const n = between(next, 3, 12);
      const nodes = Array.from({ length: n }, (_, i) => `wp${i + 1}`);
      const edges: [string, string, number][] = [];
      // A ring keeps the graph connected; a few chords and self-loops vary it.
      for (let i = 0; i < n; i++) edges.push([nodes[i], nodes[(i + 1) % n], between(next, 1, 9)]);
      for (let c = between(next, 0, n); c > 0; c--) {
        const u = between(next, 0, n - 1);
        const v = between(next, 0, n - 1);
        edges.push([nodes[u], nodes[v], between(next, 1, 9)]);
      }
      params = { family, nodes, edges };
      methods = ["graph-walk-closed-form", "entropy-rate-markov", "renyi-rate", "min-entropy-karp"];
      shape = `${n} nodes, ${edges.length} edges`;
      break;
    }
    case "hidden": {
      const s = between(next, 2, 3);
      const m = between(next, 2, 3);
      params = {
        family,
        states: ["low", "mid", "high"].slice(0, s),
        alphabet: symbols.slice(0, m),
        P: Array.from({ length: s }, () => distribution(next, s)),
        B: Array.from({ length: s }, () => distribution(next, m)),
      };
      methods = ["hidden-sandwich-bounds"];
      shape = `${s} hidden states, ${m} symbols`;
      break;
    }
  }
  const site = pick(next, SITES);
  const subject = pick(next, SUBJECTS[family]);
  const qualifier = pick(next, QUALIFIERS);
  const day = between(next, 0, 364);
  const tags = [...new Set(["synthetic", site, subject.split(" ")[0], pick(next, EXTRA_TAGS), pick(next, EXTRA_TAGS)])];
  return {
    slug: `synthetic-${k}`,
    title: `Synthetic ${k}: ${site} ${subject}, ${qualifier}`,
    summary: `A generated ${shape} model of ${subject} at ${site} (${qualifier}), for scale tests of the library. Its parameters are random, not fitted to any log.`,
    tags,
    provenance: `Generated by scripts/seed-synthetic.ts from seed ${20_260_000 + k}; not a measurement.`,
    methods,
    publishedAt: new Date(Date.UTC(2026, 0, 1 + day, 12)),
    params,
  };
}


async function main(): Promise<number> {
  const args = parseArgs(process.argv.slice(2));
  if (typeof args === "string") {
    console.log(args);
    return args === HELP ? 0 : 2;
  }

  // db() reads the environment on first use, after this.
  useLocalDatabase();

  const { count, batch } = args;
  const started = Date.now();
  let added = 0;
  let skipped = 0;
  let refused = 0;
  try {
    for (let from = 1; from <= count; from += batch) {
      const ks = Array.from({ length: Math.min(batch, count - from + 1) }, (_, i) => from + i);
      const slugs = ks.map((k) => `synthetic-${k}`);
      const present = new Set(
        (await db().select({ slug: models.slug }).from(models).where(inArray(models.slug, slugs))).map((r) => r.slug),
      );
      const fresh: { m: SyntheticModel; figures: ComputeResult }[] = [];
      for (const k of ks) {
        if (present.has(`synthetic-${k}`)) {
          skipped++;
          continue;
        }
        const m = generateSyntheticModel(k);
        const figures = computeFigures({ model: m.params });
        if (!figures.verification.passed) {
          refused++;
          continue;
        }
        fresh.push({ m, figures });
      }
      if (fresh.length === 0) continue;
      await db().transaction(async (tx) => {
        const inserted = await tx
          .insert(models)
          .values(
            fresh.map(({ m }) => ({
              slug: m.slug,
              title: m.title,
              family: m.params.family,
              summary: m.summary,
              tags: m.tags,
              provenance: m.provenance,
              methods: m.methods,
              isSynthetic: true,
              updatedAt: m.publishedAt,
            })),
          )
          .returning({ id: models.id, slug: models.slug });
        const ids = new Map(inserted.map((r) => [r.slug, r.id]));
        await tx.insert(editions).values(
          fresh.map(({ m, figures }) => ({
            modelId: ids.get(m.slug)!,
            number: 1,
            params: m.params,
            contentHash: contentHash(m.params),
            figures,
            verification: figures.verification,
            engineVersion: ENGINE_VERSION,
            note: "Generated for scale tests.",
            publishedAt: m.publishedAt,
          })),
        );
      });
      added += fresh.length;
      process.stdout.write(`\r[seed:synthetic] ${from + ks.length - 1} of ${count} looked at, ${added} added`);
    }
    process.stdout.write("\n");
    console.log(
      `[seed:synthetic] ${added} models added, ${skipped} already present` +
        (refused ? `, ${refused} left out (verification failed)` : "") +
        ` in ${((Date.now() - started) / 1000).toFixed(1)} s`,
    );
    await closeDb();
    return 0;
  } catch (error) {
    process.stdout.write("\n");
    console.error("[seed:synthetic] failed:", error);
    await closeDb();
    return 1;
  }
}

if (process.argv[1] && import.meta.url === pathToFileURL(process.argv[1]).href) process.exit(await main());
