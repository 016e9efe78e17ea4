/**
 * The WebAssembly GTH kernel: its embedded bytes are the compiled .wat, it runs here, and GTH with
 * it gives bit-for-bit the stationary law of the JavaScript loop (same operations in the same
 * order, IEEE 754 binary64 without fused multiply-add — the WebAssembly core specification's
 * f64x2.mul / f64x2.add are lane-wise binary64 operations).
 */
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { bytesFileOf, bytesModule, compileWat } from "../../scripts/build-wasm";
import { gthKernelAvailable, gthWorkspace } from "~/engine/wasm/gth-kernel";
import { stationaryGTH, stationaryResidual } from "~/engine/stationary";

function chain(n: number, seed: number, zeros: number, weak: number): { n: number; data: Float64Array } {
  let a = seed >>> 0;
  const rnd = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), a | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const data = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    let s = 0;
    for (let j = 0; j < n; j++) {
      // Two weakly coupled halves when weak > 0: a nearly decomposable chain, GTH's hard case.
      const x = rnd() < zeros ? 0 : rnd() ** 3 * (weak > 0 && i < n / 2 !== j < n / 2 ? weak : 1);
      data[i * n + j] = x;
      s += x;
    }
    data[i * n + ((i + 1) % n)] += 0.01;
    s += 0.01;
    for (let j = 0; j < n; j++) data[i * n + j] /= s;
  }
  return { n, data };
}

describe("GTH WebAssembly kernel", () => {
  it("embeds the bytes that gth-kernel.wat compiles to (run npm run build:wasm after editing it)", async () => {
    const file = "gth-kernel.wat";
    expect(readFileSync(bytesFileOf(file), "utf8")).toBe(bytesModule(file, await compileWat(file)));
  });

  it("runs in this Node.js (WebAssembly SIMD is part of V8 since Node 16.4)", () => {
    expect(gthKernelAvailable()).toBe(true);
    expect(gthWorkspace(1000).deferred4).not.toBeNull();
    expect(gthWorkspace(1000, false).deferred4).toBeNull();
  });

  it("gives the JavaScript loop's stationary law bit for bit, in both elimination orders", () => {
    fc.assert(
      fc.property(fc.integer({ min: 128, max: 300 }), fc.integer(), fc.constantFrom(0, 0.4), fc.constantFrom(0, 1e-12), fc.constantFrom("forward" as const, "reverse" as const), (n, seed, zeros, weak, order) => {
        const P = chain(n, seed, zeros, weak);
        const wasm = stationaryGTH(P, { order });
        const js = stationaryGTH(P, { order, kernel: "js" });
        expect(Array.from(wasm)).toEqual(Array.from(js));
        // And it is a stationary law (common practice: residual ‖μP − μ‖₁ near rounding).
        expect(stationaryResidual(P, wasm)).toBeLessThan(1e-12);
      }),
      { numRuns: 12 },
    );
  });
});
