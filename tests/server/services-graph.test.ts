import { readdirSync, readFileSync } from 'node:fs';
import { basename, dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const SERVICES = join(ROOT, 'server/services');
const ROUTES = join(ROOT, 'server/routes');

/** Relative module specifiers of a source text: static imports, re-exports and dynamic imports. */
function relativeSpecifiers(source: string): string[] {
  const found: string[] = [];
  const patterns = [/\bfrom\s+['"](\.[^'"]+)['"]/g, /\bimport\s+['"](\.[^'"]+)['"]/g, /\bimport\s*\(\s*['"](\.[^'"]+)['"]\s*\)/g];
  for (const pattern of patterns) for (const match of source.matchAll(pattern)) found.push(match[1]!);
  return found;
}

/** The import graph of the `.ts` files of one folder, by file name without extension; imports leaving the folder are left out. */
function folderGraph(folder: string): Map<string, string[]> {
  const names = readdirSync(folder).filter((f) => f.endsWith('.ts')).map((f) => basename(f, '.ts'));
  const graph = new Map<string, string[]>();
  for (const name of names) {
    const targets = relativeSpecifiers(readFileSync(join(folder, `${name}.ts`), 'utf8'))
      .map((spec) => resolve(folder, spec.replace(/\.(ts|js)$/, '')))
      .filter((path) => dirname(path) === folder)
      .map((path) => basename(path));
    graph.set(name, [...new Set(targets)].filter((t) => names.includes(t)));
  }
  return graph;
}

/** Every cycle found by a depth-first search, each as the path that closes it (`a → b → a`). */
function findCycles(graph: Map<string, string[]>): string[][] {
  const cycles: string[][] = [];
  const state = new Map<string, 'open' | 'done'>();
  const path: string[] = [];
  const visit = (node: string) => {
    state.set(node, 'open');
    path.push(node);
    for (const next of graph.get(node) ?? []) {
      if (state.get(next) === 'open') cycles.push([...path.slice(path.indexOf(next)), next]);
      else if (!state.has(next)) visit(next);
    }
    path.pop();
    state.set(node, 'done');
  };
  for (const node of [...graph.keys()].sort()) if (!state.has(node)) visit(node);
  return cycles;
}

describe('import graph of server/services', () => {
  it('finds a cycle when one module leads back to itself, and none in a chain', () => {
    const looped = new Map([['a', ['b']], ['b', ['c']], ['c', ['a']], ['d', ['a']]]);
    expect(findCycles(looped)).toEqual([['a', 'b', 'c', 'a']]);
    expect(findCycles(new Map([['a', ['b']], ['b', ['c']], ['c', []]]))).toEqual([]);
  });

  it('reads multi-line, type-only and re-exporting imports of a source text', () => {
    const source = "import {\n  a,\n  b,\n} from './one';\nimport type { T } from \"./two\";\nexport { c } from './three';\nimport 'node:fs';\nconst m = import('./four');\n";
    expect(relativeSpecifiers(source).sort()).toEqual(['./four', './one', './three', './two']);
  });

  it('has no import cycle among the services', () => {
    const graph = folderGraph(SERVICES);
    expect(graph.size).toBeGreaterThan(5);
    expect(graph.get('calibration')).toContain('visibility');
    const cycles = findCycles(graph).map((cycle) => cycle.join(' → '));
    expect(cycles).toEqual([]);
  });
});

describe('router wiring', () => {
  const routeFiles = readdirSync(ROUTES).filter((f) => f.endsWith('.ts'));

  it('keeps every route module free of other route modules (none mounts another router)', () => {
    const graph = folderGraph(ROUTES);
    const crossing = [...graph].filter(([, targets]) => targets.length > 0).map(([name, targets]) => `${name} → ${targets.join(', ')}`);
    expect(crossing).toEqual([]);
    for (const file of routeFiles) {
      const source = readFileSync(join(ROUTES, file), 'utf8');
      expect(source, `${relative(ROOT, join(ROUTES, file))} mounts a router`).not.toMatch(/\b\w+\.use\(\s*\w*[Rr]outer\b/);
    }
  });

  it('mounts every router of server/routes in server/app.ts', () => {
    const app = readFileSync(join(ROOT, 'server/app.ts'), 'utf8');
    for (const file of routeFiles) {
      const name = basename(file, '.ts');
      expect(app, `server/app.ts imports ./routes/${name}`).toContain(`from './routes/${name}'`);
      const exported = [...readFileSync(join(ROUTES, file), 'utf8').matchAll(/export (?:const|function) (\w+Router)\b/g)].map((m) => m[1]);
      expect(exported.length, `server/routes/${file} exports a router`).toBeGreaterThan(0);
      // A router is mounted on the API router, or on the app under a path of its own (the webhook's raw body, /dev).
      for (const router of exported) expect(app).toMatch(new RegExp(`(?:api|app)\\.use\\(\\s*(?:'[^']*',\\s*)?${router}\\b`));
    }
  });
});
