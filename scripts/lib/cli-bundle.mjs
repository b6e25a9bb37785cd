// The offline solve CLI as plain JavaScript: `npm run solve` would otherwise start tsx, whose
// loader and on-the-fly compilation took most of a one-step solve's second (measured). Bundled
// once by esbuild into dist/cli/, rebuilt whenever one of its sources is newer than the bundle.
import { existsSync, mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import vm from 'node:vm';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const outDir = path.join(root, 'dist', 'cli');
const bundle = path.join(outDir, 'solve.cjs');
/** V8's compiled code of the bundle, written after its first run. */
const codeCache = path.join(outDir, 'solve.code-cache');
/** Every source file the last build read, written beside the bundle. */
const inputsFile = path.join(outDir, 'inputs.json');

/** Written whole under a temporary name, then renamed: a CLI started meanwhile reads the old file or the new one. */
function writeWhole(file, contents) {
  const temporary = `${file}.${process.pid}.tmp`;
  writeFileSync(temporary, contents);
  renameSync(temporary, file);
}

function fresh() {
  if (!existsSync(bundle) || !existsSync(inputsFile)) return false;
  const built = statSync(bundle).mtimeMs;
  const inputs = JSON.parse(readFileSync(inputsFile, 'utf8'));
  return inputs.every((file) => existsSync(file) && statSync(file).mtimeMs <= built);
}

/**
 * Everything is bundled but HiGHS, which stays a package import (its loader and WebAssembly are
 * found in node_modules): loading zod's and luxon's many module files one by one took longer
 * than one bundle. The CLI is CommonJS so that V8 can keep its compiled code (`runCli` below);
 * compiling the bundle as an ES module took about as long as the rest of a one-step solve.
 * The solver pool starts its threads from `./highs-worker.mjs` beside its own module, so the
 * thread body is bundled under that name next to the CLI.
 */
async function build() {
  const { build: esbuild } = await import('esbuild');
  const common = { bundle: true, platform: 'node', target: 'node20', minify: true, keepNames: true, external: ['highs'], metafile: true, write: false, logLevel: 'warning' };
  const cli = await esbuild({
    ...common,
    entryPoints: [path.join(root, 'api/src/cli/solve.ts')],
    outfile: bundle,
    format: 'cjs',
    define: { 'import.meta.url': '__cliModuleUrl' },
    banner: { js: 'const __cliModuleUrl = require("node:url").pathToFileURL(__filename).href;' },
  });
  const worker = await esbuild({ ...common, entryPoints: [path.join(root, 'api/src/solver/highs-worker-main.ts')], outfile: path.join(outDir, 'highs-worker.mjs'), format: 'esm' });
  mkdirSync(outDir, { recursive: true });
  // The worker first, the bundle last: a bundle newer than its sources is taken as complete.
  for (const out of [...worker.outputFiles, ...cli.outputFiles]) writeWhole(out.path, out.contents);
  const inputs = [...Object.keys(cli.metafile.inputs), ...Object.keys(worker.metafile.inputs)].map((file) => path.resolve(root, file));
  writeWhole(inputsFile, JSON.stringify([...new Set(inputs)]));
  writeWhole(codeCache, '');
}

/** The bundled CLI, built first when it is missing or older than one of its sources. */
export async function ensureCliBundle() {
  if (!fresh()) await build();
}

/**
 * Runs the bundled CLI (built first when missing or older than a source) with V8's code cache:
 * the first run writes it, later runs skip compiling the bundle.
 */
export async function runCli() {
  await ensureCliBundle();
  const cached = existsSync(codeCache) ? readFileSync(codeCache) : undefined;
  const script = new vm.Script(`(function (exports, require, module, __filename, __dirname) {${readFileSync(bundle, 'utf8')}\n})`, {
    filename: bundle,
    cachedData: cached?.length ? cached : undefined,
  });
  const module = { exports: {} };
  script.runInThisContext()(module.exports, createRequire(bundle), module, bundle, outDir);
  if (!cached?.length || script.cachedDataRejected) writeWhole(codeCache, script.createCachedData());
}
