/**
 * Command-line compute: `npm run compute -- model.json` (or `-` for standard input). The file holds a
 * bare model (`{ "family": … }`) or a full request (`{ "model": … }`); the output is the compute
 * API's JSON. Exit codes: 0 computed, 2 unreadable file, bad JSON or invalid model, 1 engine failure.
 */
import { readFileSync } from "node:fs";
import { EngineInputError, computeFigures } from "../app/engine/index";

const USAGE = `Usage: npm run compute -- <model.json | ->

Computes the entropy figures of one model and prints them as JSON (the same JSON as
POST /api/v1/compute). The file may hold a bare model, e.g.
  { "family": "two-state", "alphabet": ["calm", "swell"], "a": 0.1, "b": 0.3 }
or a full request { "model": …, "renyiOrders": [3], "blockLengths": 16, "normalize": true, "seed": 7 }.
Use - to read standard input.

Exit status: 0 on success; 2 if the file cannot be read, is not JSON or the model is invalid
(the problems are listed on standard error); 1 if the engine fails.
`;

function readInput(arg: string): string {
  return arg === "-" ? readFileSync(0, "utf8") : readFileSync(arg, "utf8");
}

function main(argv: string[]): number {
  if (argv.includes("--help") || argv.includes("-h")) {
    process.stdout.write(USAGE);
    return 0;
  }
  const files = argv.filter((a) => a !== "--");
  if (files.length !== 1) {
    process.stderr.write(`error: expected one model file (or -), got ${files.length}\n\n${USAGE}`);
    return 2;
  }
  const arg = files[0];
  let text: string;
  try {
    text = readInput(arg);
  } catch (e) {
    process.stderr.write(`error: cannot read ${arg === "-" ? "standard input" : arg}: ${(e as Error).message}\n`);
    return 2;
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    process.stderr.write(`error: ${arg === "-" ? "standard input" : arg} is not valid JSON: ${(e as Error).message}\n`);
    return 2;
  }
  const request = json !== null && typeof json === "object" && !Array.isArray(json) && !("model" in json) ? { model: json } : json;
  try {
    const result = computeFigures(request);
    process.stdout.write(JSON.stringify(result, null, 2) + "\n");
    return 0;
  } catch (e) {
    if (e instanceof EngineInputError) {
      process.stderr.write(`error: ${e.message}\n`);
      for (const issue of e.issues) process.stderr.write(`  ${issue.path || "(model)"}: ${issue.message}\n`);
      return 2;
    }
    process.stderr.write(`error: the engine failed: ${(e as Error).message}\n`);
    return 1;
  }
}

process.exitCode = main(process.argv.slice(2));
