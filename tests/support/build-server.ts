/**
 * A prebuilt server for the tests that start real server processes (tests/server/child-server.ts,
 * tests/e2e/harness.ts): server/index.ts and everything it imports, from server/, shared/ and the
 * npm packages, bundled once per test run into one ES module. Starting that file skips tsx's loader
 * and the module resolution of ~150 TypeScript files and of the packages' ~1,000 files on every
 * spawn: Node 20's ES module loader spent about 0.8 s of CPU per start resolving and loading
 * them (measured: 2.9 s -> 2.05 s of CPU from spawn to listening, median of 3, this machine), and
 * the kill -9 loop alone starts the server 51 times.
 *
 * - `import.meta.url` in each of our bundled files is replaced by that file's own URL, so paths
 *   such as ../../drizzle or ./compute-thread-boot.mjs resolve exactly as under tsx;
 * - PGlite stays external: it loads its WebAssembly and file-system image relative to its own
 *   files; the packages' CommonJS `require`s of Node built-ins go through createRequire (banner);
 * - the source map is a linked file (server.mjs.map), read only with --enable-source-maps, so that
 *   the bundle itself stays small (7 MB instead of 25 MB with the map inline).
 */
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build } from 'esbuild';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));

/**
 * Packages that stay in node_modules: PGlite (see the header), pg's optional native driver, and the
 * development tools that only `--dev` imports (vite and what it loads).
 */
const EXTERNAL = ['@electric-sql/pglite', '@electric-sql/pglite/*', '@electric-sql/pglite-tools', '@electric-sql/pglite-tools/*', 'pg-native', 'vite', 'tsx', 'tsx/*', 'esbuild', 'lightningcss'];

/** Bundles server/index.ts into outDir/server.mjs (outDir must lie inside the repository so that packages resolve); returns the file. */
export async function buildServer(outDir: string): Promise<string> {
  mkdirSync(outDir, { recursive: true });
  const outfile = path.join(outDir, 'server.mjs');
  await build({
    entryPoints: [path.join(ROOT, 'server/index.ts')],
    outfile,
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    external: [...EXTERNAL],
    banner: { js: "import { createRequire as __parallaxCreateRequire } from 'node:module'; const require = __parallaxCreateRequire(import.meta.url);" },
    sourcemap: 'linked',
    logLevel: 'warning',
    tsconfig: path.join(ROOT, 'tsconfig.json'),
    plugins: [{
      name: 'own-import-meta-url',
      setup(b) {
        b.onLoad({ filter: /\.(ts|tsx|mts)$/ }, (args) => {
          if (args.path.includes(`${path.sep}node_modules${path.sep}`)) return undefined;
          const text = readFileSync(args.path, 'utf8').replaceAll('import.meta.url', JSON.stringify(pathToFileURL(args.path).href));
          return { contents: text, loader: args.path.endsWith('x') ? 'tsx' : 'ts' };
        });
      },
    }],
  });
  return outfile;
}
