/**
 * The GTH deferred-update kernel in WebAssembly (SIMD), with the working matrix in the module's
 * memory. Source: gth-kernel.wat; bytes: gth-kernel.bytes.ts (npm run build:wasm). Where
 * WebAssembly or its SIMD instructions are missing, or memory cannot be reserved, the caller gets
 * a plain Float64Array and no kernel, and uses the JavaScript loop, which gives the same bits.
 */
import { WASM_BASE64 } from "./gth-kernel.bytes";

/** d_r[j] += Σ_p f_rp·s_p[j] for r, p = 0…3 and j < len; byte offsets into the workspace memory (see the .wat). */
export type Deferred4 = (
  d: number, s: number, n8: number, len: number,
  f00: number, f01: number, f02: number, f03: number,
  f10: number, f11: number, f12: number, f13: number,
  f20: number, f21: number, f22: number, f23: number,
  f30: number, f31: number, f32: number, f33: number,
) => void;

let compiled: WebAssembly.Module | null | undefined;

function kernelModule(): WebAssembly.Module | null {
  if (compiled !== undefined) return compiled;
  compiled = null;
  try {
    if (typeof WebAssembly === "object" && typeof atob === "function") {
      const bytes = Uint8Array.from(atob(WASM_BASE64), (c) => c.charCodeAt(0));
      // validate() is false where SIMD is not supported; the module is under 1 KB, so compiling
      // it synchronously is allowed on a browser's main thread too.
      if (WebAssembly.validate(bytes)) compiled = new WebAssembly.Module(bytes);
    }
  } catch {
    compiled = null;
  }
  return compiled;
}

/** A working array of `length` doubles, in WebAssembly memory with the kernel when possible. */
export interface GthWorkspace {
  a: Float64Array;
  deferred4: Deferred4 | null;
}

const PAGE = 65536;

export function gthWorkspace(length: number, useKernel = true): GthWorkspace {
  const bytes = length * 8;
  const mod = useKernel && bytes < 2 ** 31 ? kernelModule() : null;
  if (mod) {
    try {
      const memory = new WebAssembly.Memory({ initial: Math.max(1, Math.ceil(bytes / PAGE)) });
      const instance = new WebAssembly.Instance(mod, { engine: { memory } });
      return { a: new Float64Array(memory.buffer, 0, length), deferred4: instance.exports.deferred4 as unknown as Deferred4 };
    } catch {
      // Memory could not be reserved: fall through to the JavaScript loop.
    }
  }
  return { a: new Float64Array(length), deferred4: null };
}

/** Whether this runtime runs the kernel (for the benchmark's table and the tests). */
export function gthKernelAvailable(): boolean {
  return kernelModule() !== null;
}
