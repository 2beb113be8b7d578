/**
 * `pnpm build` is `tsc --build tsconfig.build.json`: the root file references every package, and each
 * package's tsconfig.build.json references the workspace packages it imports, which sets the build
 * order. These checks keep those lists in step with the package.json files, so a new package or a
 * new workspace dependency cannot silently drop out of the build (or build before what it needs).
 */
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
});
