/**
 * `npm run lint` (after eslint): the import graph of server/, shared/, src/ and scripts/ has no
 * cycle. Static imports and re-exports count, type-only ones too (a type cycle is still two modules
 * that cannot be understood or moved apart: the 15-file cycle through server/app.ts was one);
 * dynamic import() does not. Exits 1 naming every cycle (a strongly connected component, with one
 * concrete loop through it).
 *
 * `npm run -s lint:imports -- --report` also prints the graph's size: files, edges, cycles with and
 * without type-only imports, and the largest files.
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const TREES = ['server', 'shared', 'src', 'scripts'];
const report = process.argv.includes('--report');

const cfgFile = ts.findConfigFile(ROOT, ts.sys.fileExists, 'tsconfig.json')!;
const cfg = ts.parseJsonConfigFileContent(ts.readConfigFile(cfgFile, ts.sys.readFile).config, ts.sys, ROOT);
const files = cfg.fileNames.filter((f) => TREES.some((t) => path.relative(ROOT, f).startsWith(`${t}${path.sep}`)) && /\.(ts|tsx|mts)$/.test(f) && !f.endsWith('.d.ts'));
const known = new Set(files.map((f) => path.resolve(f)));
const host = ts.createCompilerHost(cfg.options);

interface Edge { to: string; typeOnly: boolean }
const graph = new Map<string, Edge[]>();
const lines = new Map<string, number>();

function specifiers(sf: ts.SourceFile): { spec: string; typeOnly: boolean }[] {
  const out: { spec: string; typeOnly: boolean }[] = [];
  for (const st of sf.statements) {
    if (ts.isImportDeclaration(st) && ts.isStringLiteral(st.moduleSpecifier)) {
      const c = st.importClause;
      const typeOnly = !!c && (c.isTypeOnly || (!c.name && !!c.namedBindings && ts.isNamedImports(c.namedBindings) && c.namedBindings.elements.length > 0 && c.namedBindings.elements.every((e) => e.isTypeOnly)));
      out.push({ spec: st.moduleSpecifier.text, typeOnly });
    } else if (ts.isExportDeclaration(st) && st.moduleSpecifier && ts.isStringLiteral(st.moduleSpecifier)) {
      const typeOnly = st.isTypeOnly || (!!st.exportClause && ts.isNamedExports(st.exportClause) && st.exportClause.elements.length > 0 && st.exportClause.elements.every((e) => e.isTypeOnly));
      out.push({ spec: st.moduleSpecifier.text, typeOnly });
    }
  }
  return out;
}

for (const f of files) {
  const text = readFileSync(f, 'utf8');
  lines.set(path.resolve(f), text.split('\n').length);
  const sf = ts.createSourceFile(f, text, ts.ScriptTarget.Latest, false, f.endsWith('x') ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const edges: Edge[] = [];
  for (const { spec, typeOnly } of specifiers(sf)) {
    const r = ts.resolveModuleName(spec, f, cfg.options, host).resolvedModule;
    if (!r || r.isExternalLibraryImport) continue;
    const to = path.resolve(r.resolvedFileName);
    if (known.has(to)) edges.push({ to, typeOnly });
  }
  graph.set(path.resolve(f), edges);
}

/** Tarjan's strongly connected components; components of more than one file (or a self-import) are cycles. */
function cycles(withTypes: boolean): string[][] {
  let index = 0;
  const idx = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const on = new Set<string>();
  const out: string[][] = [];
  const next = (v: string) => graph.get(v)!.filter((e) => withTypes || !e.typeOnly).map((e) => e.to);
  const visit = (v: string) => {
    idx.set(v, index); low.set(v, index); index++;
    stack.push(v); on.add(v);
    for (const w of next(v)) {
      if (!idx.has(w)) { visit(w); low.set(v, Math.min(low.get(v)!, low.get(w)!)); }
      else if (on.has(w)) low.set(v, Math.min(low.get(v)!, idx.get(w)!));
    }
    if (low.get(v) === idx.get(v)) {
      const comp: string[] = [];
      let w: string;
      do { w = stack.pop()!; on.delete(w); comp.push(w); } while (w !== v);
      if (comp.length > 1 || next(v).includes(v)) out.push(comp);
    }
  };
  for (const v of graph.keys()) if (!idx.has(v)) visit(v);
  return out;
}

/** One loop inside a component, for the message: a path from its first file back to itself. */
function loopIn(comp: string[]): string[] {
  const inComp = new Set(comp);
  const start = [...comp].sort()[0];
  const prev = new Map<string, string>();
  const queue = [start];
  while (queue.length) {
    const v = queue.shift()!;
    for (const e of graph.get(v)!) {
      if (!inComp.has(e.to)) continue;
      if (e.to === start) {
        const p = [start];
        for (let x = v; x !== start; x = prev.get(x)!) p.splice(1, 0, x);
        return [...p, start];
      }
      if (!prev.has(e.to)) { prev.set(e.to, v); queue.push(e.to); }
    }
  }
  return comp;
}

const rel = (f: string) => path.relative(ROOT, f);
const runtime = cycles(false);
const all = cycles(true);
if (report) {
  const edges = [...graph.values()].reduce((a, es) => a + es.length, 0);
  console.log(`import graph: ${graph.size} files, ${edges} edges; cycles: ${runtime.length} (${runtime.reduce((a, c) => a + c.length, 0)} files) counting runtime imports, ${all.length} (${all.reduce((a, c) => a + c.length, 0)} files) counting type-only imports too`);
  for (const c of all) console.log(`  type-inclusive cycle of ${c.length}: ${c.map(rel).sort().join(', ')}`);
  console.log('largest files (lines):');
  for (const [f, n] of [...lines].sort((a, b) => b[1] - a[1]).slice(0, 10)) console.log(`  ${String(n).padStart(5)}  ${rel(f)}`);
}
if (all.length) {
  console.error(`import cycles: ${all.length}. Modules in a cycle cannot be loaded, read or moved apart one at a time (with runtime imports, one is loaded half-initialised); break the loop by moving the shared piece into its own module.`);
  for (const c of all) console.error(`  ${c.length} files: ${loopIn(c).map(rel).join(' -> ')}`);
  process.exit(1);
} else if (!report) {
  console.log(`import graph: ${graph.size} files, no cycles`);
}
