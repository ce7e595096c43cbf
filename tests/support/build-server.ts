/**
 * A prebuilt server for the tests that start real server processes (tests/server/child-server.ts,
 * tests/e2e/harness.ts): server/index.ts and everything it imports from server/ and shared/ bundled
 * once per test run into one ES module (packages stay external and resolve from node_modules).
 * Starting that file skips tsx's loader and the per-file module resolution of ~150 TypeScript
 * files on every spawn. `import.meta.url` in each bundled file is replaced by that file's own URL,
 * so paths such as ../../drizzle or ./compute-thread-boot.mjs resolve exactly as under tsx.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { build } from 'esbuild';

export const ROOT = fileURLToPath(new URL('../..', import.meta.url));

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
    packages: 'external',
    sourcemap: 'inline',
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
