/**
 * `pnpm build` is `tsc --build tsconfig.build.json`: the root file references every package, and each
 * package's tsconfig.build.json references the workspace packages it imports, which sets the build
 * order. These checks keep those lists in step with the package.json files, so a new package or a
 * new workspace dependency cannot silently drop out of the build (or build before what it needs).
 * The root `pnpm build` (scripts/build.mjs) then bundles the stdlib distributions module: the last
 * check reads that bundle where the build has run (CI builds on install). The WebAssembly kernels'
 * binaries (NAME.wasm.ts) must be what their text (NAME.wat) assembles to.
 */
import { spawnSync } from 'node:child_process';
import { createRequire } from 'node:module';
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../../../..');

interface Manifest {
  name: string;
  private?: boolean;
  dependencies?: Record<string, string>;
  exports?: Record<string, unknown>;
  files?: string[];
  scripts?: Record<string, string>;
}

/** JSON with `//` line comments (tsconfig files may carry them). */
const readJson = (file: string): unknown => JSON.parse(readFileSync(file, 'utf8').replace(/^\s*\/\/.*$/gm, ''));

const packages = readdirSync(join(repoRoot, 'packages'))
  .filter((d) => existsSync(join(repoRoot, 'packages', d, 'package.json')))
  .map((dir) => ({ dir, manifest: readJson(join(repoRoot, 'packages', dir, 'package.json')) as Manifest }));
const dirOf = new Map(packages.map((p) => [p.manifest.name, p.dir]));
const refs = (file: string): string[] =>
  ((readJson(file) as { references?: { path: string }[] }).references ?? []).map((r) => r.path);

describe('the build configuration', () => {
  it('references every package from the root tsconfig.build.json', () => {
    expect(packages.length).toBeGreaterThanOrEqual(7);
    const listed = refs(join(repoRoot, 'tsconfig.build.json')).sort();
    expect(listed).toEqual(packages.map((p) => `packages/${p.dir}/tsconfig.build.json`).sort());
  });
  it("references in each package's tsconfig.build.json exactly the workspace packages it depends on", () => {
    for (const { dir, manifest } of packages) {
      const workspaceDeps = Object.entries(manifest.dependencies ?? {})
        .filter(([, range]) => range.startsWith('workspace:'))
        .map(([name]) => `../${dirOf.get(name) ?? `(no folder for ${name})`}/tsconfig.build.json`);
      expect(refs(join(repoRoot, 'packages', dir, 'tsconfig.build.json')).sort(), dir).toEqual(workspaceDeps.sort());
    }
  });
  it('has every public package export built JavaScript and declarations from dist/, its sources under the source condition, and ship dist/', () => {
    for (const { dir, manifest } of packages.filter((p) => p.manifest.private !== true)) {
      expect(manifest.exports?.['.'], dir).toEqual({ '@motorprint/source': './src/index.ts', types: './dist/index.d.ts', default: './dist/index.js' });
      expect(manifest.files, dir).toContain('dist');
      expect(manifest.scripts?.build, dir).toBe('tsc -b tsconfig.build.json');
      expect(Object.keys(manifest.dependencies ?? {}), `${dir} must not need the private test helpers at run time`).not.toContain('@motorprint/testkit');
    }
  });
  it('builds through scripts/build.mjs at the root, and each bundled vendor module agrees with the library itself', async () => {
    const root = readJson(join(repoRoot, 'package.json')) as Manifest;
    expect(root.scripts?.build).toBe('node scripts/build.mjs');
    expect(root.scripts?.prepare).toMatch(/^node scripts\/build\.mjs /);
    const dist = (pkg: string, name: string): string => join(repoRoot, 'packages', pkg, 'dist', `${name}.js`);
    const modules = [dist('estimate', 'distributions'), dist('estimate', 'matrices'), dist('ingest', 'csvParser')];
    const missing = modules.filter((f) => !existsSync(f));
    if (missing.length > 0) {
      console.warn(`skipped the bundle checks: ${missing.join(', ')} not built (run pnpm build)`);
      return;
    }
    for (const file of modules) {
      const text = readFileSync(file, 'utf8');
      expect(text.startsWith('// motorprint: bundled by scripts/build.mjs'), file).toBe(true);
      // One file: no import of the bundled libraries is left in it (Node built-ins only).
      expect(text, file).not.toMatch(/(from\s*|require\(|import\()["'](@stdlib\/|ml-|papaparse)/);
    }
    const stdlib = createRequire(join(repoRoot, 'packages', 'estimate', 'package.json'));
    const own = (name: string): ((...a: number[]) => number) => stdlib(`@stdlib/stats-base-dists-${name}`) as (...a: number[]) => number;
    const built = (await import(modules[0]!)) as Record<'chisquareCdf' | 'fCdf' | 'normalCdf' | 'tQuantile', (...a: number[]) => number>;
    // Points across the ranges the tests and intervals use (exact equality: the same code).
    for (const [p, dof] of [[0.975, 1], [0.975, 7.3], [0.995, 40], [0.6, 1e5]] as const) expect(built.tQuantile(p, dof)).toBe(own('t-quantile')(p, dof));
    for (const [x, d1, d2] of [[2.1, 3, 40], [0.4, 1, 5], [12, 2, 1e4]] as const) expect(built.fCdf(x, d1, d2)).toBe(own('f-cdf')(x, d1, d2));
    for (const [x, k] of [[3.2, 4], [70, 50], [0.01, 1]] as const) expect(built.chisquareCdf(x, k)).toBe(own('chisquare-cdf')(x, k));
    for (const x of [-3, 0, 1.3]) expect(built.normalCdf(x, 0, 1)).toBe(own('normal-cdf')(x, 0, 1));
    // The matrices: the singular values of a small ill-conditioned matrix, as ml-matrix gives them.
    type Svd = new (m: unknown) => { diagonal: number[] };
    type Mat = { new (rows: number[][]): unknown };
    const bundled = (await import(modules[1]!)) as { Matrix: Mat; SingularValueDecomposition: Svd; levenbergMarquardt: unknown };
    const library = (await import(stdlib.resolve('ml-matrix'))) as { Matrix: Mat; SingularValueDecomposition: Svd };
    const rows = [[1, 2, 3], [4, 5, 6], [7, 8, 9.000001]];
    expect(new bundled.SingularValueDecomposition(new bundled.Matrix(rows)).diagonal).toEqual(new library.SingularValueDecomposition(new library.Matrix(rows)).diagonal);
    expect(typeof bundled.levenbergMarquardt).toBe('function');
    // The CSV parser: a quoted cell with the delimiter inside.
    const { Papa } = (await import(modules[2]!)) as { Papa: { parse: (t: string, o: object) => { data: string[][] } } };
    expect(Papa.parse('a,"b,c"\n1,2', { delimiter: ',' }).data).toEqual([['a', 'b,c'], ['1', '2']]);
  });
  it('has each WebAssembly kernel (.wasm.ts) assembled from its .wat as committed', async () => {
    type Script = { kernelSources(): string[]; assembledText(wabt: unknown, wat: string): string };
    const script = (await import(join(repoRoot, 'scripts', 'assemble-kernels.mjs'))) as Script;
    const wabt = await ((await import('wabt')) as unknown as { default: () => Promise<unknown> }).default();
    const sources = script.kernelSources();
    expect(sources.length).toBeGreaterThanOrEqual(1);
    for (const wat of sources) {
      const target = wat.replace(/\.wat$/, '.wasm.ts');
      expect(existsSync(target), `${target} is missing: run pnpm build`).toBe(true);
      expect(readFileSync(target, 'utf8'), `${target} is out of date: run pnpm build`).toBe(script.assembledText(wabt, wat));
    }
  });
  it("has the generated section of estimate's kernel text as its generator writes it", () => {
    // scripts/generate-estimate-kernels.mjs --check exits 1 (and says so) when the .wat has drifted.
    const run = spawnSync(process.execPath, [join(repoRoot, 'scripts', 'generate-estimate-kernels.mjs'), '--check'], { encoding: 'utf8' });
    expect(run.stderr).toBe('');
    expect(run.status).toBe(0);
  });
});
