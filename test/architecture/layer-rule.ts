/**
 * The layer rule of src/, as data, and a checker over the import graph.
 *
 * Every file belongs to the layer named by its first folder under src/
 * (root files by their base name: `errors.ts` → errors, `index.ts` → index).
 * A file may import files of its own layer and of the layers listed for it
 * below, nothing else; and no chain of imports may lead back to where it
 * started. Imports are read with the TypeScript scanner (static, type-only,
 * re-exports and dynamic `import('…')` alike), so the rule also covers
 * modules that are loaded lazily.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, posix, relative, sep } from 'node:path';
import ts from 'typescript';

const BASE = ['errors', 'physics', 'numerics', 'io'];
const LIGHT = [...BASE, 'light'];
const JUNCTION = [...LIGHT, 'junction'];
const STACK = [...JUNCTION, 'stack'];
const SEARCH = [...STACK, 'materials', 'search'];
const DESIGN = [...SEARCH, 'design'];
const REPORT = [...DESIGN, 'report'];

/**
 * Layer → the layers it may import, bottom first. Read upward:
 * physics/numerics ← light ← junction ← stack ← search ← design ← report ← cli,
 * with materials beside the engine chain (it needs only the base) and usable
 * from search upward; io (safe reading and atomic writing of files) is a base
 * utility every layer may use; sites (batches over many weather files) sits
 * over the report; bench sits beside cli over the engine, design files and sites; index is the public
 * library surface.
 */
export const MAY_IMPORT: Readonly<Record<string, readonly string[]>> = {
  errors: [],
  physics: ['errors'],
  numerics: ['errors'],
  io: ['errors'],
  light: BASE,
  junction: LIGHT,
  stack: JUNCTION,
  materials: BASE,
  search: STACK.concat('materials'),
  design: SEARCH,
  report: DESIGN,
  sites: REPORT,
  cli: [...REPORT, 'sites'],
  bench: [...DESIGN, 'sites'],
  index: [...REPORT, 'sites'],
};

export interface SourceFile {
  /** Path relative to src/, with forward slashes (`light/spectrum.ts`). */
  path: string;
  text: string;
}

export interface ImportEdge {
  from: string;
  to: string;
}

/** The layer a src-relative path belongs to. */
export function layerOf(path: string): string {
  const first = path.split('/')[0];
  return path.includes('/') ? first : first.replace(/(\.d)?\.ts$/, '');
}

/** Every .ts file under a directory, relative to it. */
export function readSources(srcDir: string): SourceFile[] {
  const out: SourceFile[] = [];
  const walk = (dir: string) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      const full = join(dir, e.name);
      if (e.isDirectory()) walk(full);
      else if (e.name.endsWith('.ts')) out.push({ path: relative(srcDir, full).split(sep).join('/'), text: readFileSync(full, 'utf8') });
    }
  };
  walk(srcDir);
  return out.sort((a, b) => a.path.localeCompare(b.path));
}

/** Relative imports between the given files (package and node: imports are not part of the rule). */
export function importEdges(files: readonly SourceFile[]): ImportEdge[] {
  const known = new Set(files.map((f) => f.path));
  const edges: ImportEdge[] = [];
  for (const f of files) {
    const info = ts.preProcessFile(f.text, true, true);
    for (const ref of info.importedFiles) {
      const spec = ref.fileName;
      if (!spec.startsWith('.')) continue;
      const target = posix.normalize(posix.join(posix.dirname(f.path), spec)).replace(/\.js$/, '.ts');
      const to = known.has(target) ? target : known.has(`${target}/index.ts`) ? `${target}/index.ts` : target;
      if (!edges.some((e) => e.from === f.path && e.to === to)) edges.push({ from: f.path, to });
    }
  }
  return edges;
}

/** One line per import that breaks the layer table (including files in layers the table does not know). */
export function layerViolations(files: readonly SourceFile[], table = MAY_IMPORT): string[] {
  const out: string[] = [];
  for (const f of files) {
    if (!(layerOf(f.path) in table)) out.push(`src/${f.path}: layer '${layerOf(f.path)}' is not in the layer table; place it there and in DEVELOPERS.md`);
  }
  for (const e of importEdges(files)) {
    const a = layerOf(e.from);
    const b = layerOf(e.to);
    if (a === b || !(a in table)) continue;
    if (!table[a].includes(b)) {
      out.push(`src/${e.from} imports src/${e.to}: ${a}/ may not import ${b}/ (${a}/ may import ${table[a].join(', ') || 'nothing'})`);
    }
  }
  return out;
}

/** Import cycles between files, each as a closed path `a → b → … → a` (Tarjan's strongly connected components). */
export function importCycles(files: readonly SourceFile[]): string[] {
  const edges = importEdges(files);
  const next = new Map<string, string[]>();
  for (const f of files) next.set(f.path, []);
  for (const e of edges) next.get(e.from)?.push(e.to);
  let counter = 0;
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const stack: string[] = [];
  const onStack = new Set<string>();
  const components: string[][] = [];
  const visit = (v: string) => {
    index.set(v, counter);
    low.set(v, counter);
    counter++;
    stack.push(v);
    onStack.add(v);
    for (const w of next.get(v) ?? []) {
      if (!next.has(w)) continue;
      if (!index.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, index.get(w)!));
    }
    if (low.get(v) === index.get(v)) {
      const comp: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        comp.push(w);
      } while (w !== v);
      if (comp.length > 1 || (next.get(v) ?? []).includes(v)) components.push(comp);
    }
  };
  for (const v of next.keys()) if (!index.has(v)) visit(v);
  return components.map((comp) => {
    // Walk one concrete cycle inside the component, starting from its first file in name order.
    const inside = new Set(comp);
    const start = [...comp].sort()[0];
    const path = [start];
    const seen = new Set([start]);
    let v = start;
    for (;;) {
      const w = (next.get(v) ?? []).filter((x) => inside.has(x)).sort()[0];
      if (w === start || seen.has(w)) {
        path.push(w);
        break;
      }
      path.push(w);
      seen.add(w);
      v = w;
    }
    const from = path.indexOf(path[path.length - 1]);
    return path.slice(from).map((p) => `src/${p}`).join(' → ');
  });
}

/** The repository's src/ directory. */
export const SRC_DIR = join(dirname(new URL(import.meta.url).pathname), '..', '..', 'src');

/**
 * Packages a module loads when it is imported, following only imports that
 * run at load time (static `import`/`export … from`, not `import('…')` and not
 * `import type`), through the given files.
 */
export function packagesLoadedBy(files: readonly SourceFile[], entry: string): Set<string> {
  const byPath = new Map(files.map((f) => [f.path, f]));
  const seen = new Set<string>();
  const packages = new Set<string>();
  const visit = (path: string) => {
    if (seen.has(path)) return;
    seen.add(path);
    const f = byPath.get(path);
    if (!f) return;
    const sf = ts.createSourceFile(path, f.text, ts.ScriptTarget.ES2022, false, ts.ScriptKind.TS);
    for (const st of sf.statements) {
      let spec: string | undefined;
      if (ts.isImportDeclaration(st) && !st.importClause?.isTypeOnly) spec = (st.moduleSpecifier as ts.StringLiteral).text;
      if (ts.isExportDeclaration(st) && !st.isTypeOnly && st.moduleSpecifier) spec = (st.moduleSpecifier as ts.StringLiteral).text;
      if (spec === undefined) continue;
      if (!spec.startsWith('.')) {
        packages.add(spec);
        continue;
      }
      const target = posix.normalize(posix.join(posix.dirname(path), spec)).replace(/\.js$/, '.ts');
      visit(byPath.has(target) ? target : `${target}/index.ts`);
    }
  };
  visit(entry);
  return packages;
}
