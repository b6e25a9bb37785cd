import { readFile } from 'node:fs/promises';
import { createRequire } from 'node:module';

/** A WebAssembly.Module, opaque here: the api's TypeScript lib declares no WebAssembly types. */
export type CompiledHighs = object;

const { WebAssembly: wasm } = globalThis as unknown as {
  WebAssembly: { compile(bytes: Uint8Array): Promise<CompiledHighs>; instantiate(module: CompiledHighs, imports: object): Promise<object> };
};

/**
 * HiGHS's WebAssembly, read from the `highs` package and compiled. A pool compiles it once and
 * hands the module to every worker thread it starts: a fresh thread then starts without
 * recompiling and reuses the code V8 has already optimised for earlier threads.
 */
export async function compileHighs(): Promise<CompiledHighs> {
  const bytes = await readFile(createRequire(import.meta.url).resolve('highs/runtime'));
  return wasm.compile(bytes);
}

/**
 * Loader options that make the `highs` loader instantiate an already compiled module. The
 * loader's own `wasmModule` option is declared but never read (highs 1.15.3: it reads and
 * compiles the file beside it again); the Emscripten `instantiateWasm` hook it is built with is.
 */
export function instantiateCompiled(module: CompiledHighs): { instantiateWasm(imports: object, receive: (instance: object) => void): object } {
  return {
    instantiateWasm(imports, receive) {
      void wasm.instantiate(module, imports).then(receive);
      return {};
    },
  };
}
