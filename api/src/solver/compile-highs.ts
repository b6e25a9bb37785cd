import { readFile } from 'node:fs/promises';
import { createRequire } from 'node:module';

/** A WebAssembly.Module, opaque here: the api's TypeScript lib declares no WebAssembly types. */
export type CompiledHighs = object;

const { WebAssembly: wasm } = globalThis as unknown as { WebAssembly: { compile(bytes: Uint8Array): Promise<CompiledHighs> } };

/**
 * HiGHS's WebAssembly, read from the `highs` package and compiled. A pool compiles it once and
 * hands the module to every worker thread it starts: a fresh thread then starts without
 * recompiling and reuses the code V8 has already optimised for earlier threads.
 */
export async function compileHighs(): Promise<CompiledHighs> {
  const bytes = await readFile(createRequire(import.meta.url).resolve('highs/runtime'));
  return wasm.compile(bytes);
}
