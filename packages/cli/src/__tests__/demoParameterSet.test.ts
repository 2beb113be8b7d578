import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { runCli, EXIT, type CliIo } from '@motorprint/cli';

const repoRoot = resolve(dirname(fileURLToPath(import.meta.url)), '../../../..');
type Node = Record<string, unknown>;
const schema = JSON.parse(readFileSync(join(repoRoot, 'docs/parameter-set.schema.json'), 'utf8')) as Node;

// The fit of the README demo (package.json "demo"): the invented Tern 24 recordings, the PRBS run held out.
const FITTED = ['tern24-locked-rotor.csv', 'tern24-step.csv', 'tern24-coast-down.csv', 'tern24-steady-state.csv'].map((f) => `fixtures/demo/${f}`);
const HELD_OUT = 'fixtures/demo/tern24-prbs.csv';
let doc: Node;
/** The step run alone (10 000 residual rows, below the score-test screen): its candidates are fitted and compared. */
let stepDoc: Node;
let html = '';

beforeAll(async () => {
  const dir = mkdtempSync(join(tmpdir(), 'mp-demo-set-'));
  const err: string[] = [];
  const out: string[] = [];
  const io: CliIo = { stdout: (t) => out.push(t), stderr: (t) => err.push(t), cwd: repoRoot, env: { NO_COLOR: '1' }, isTty: false };
  const code = await runCli(['fit', ...FITTED, '--check', HELD_OUT, '--id', 'motor=Tern 24 (invented)', '--out', join(dir, 'set.json'), '--report', join(dir, 'report.html')], io);
  expect(code, err.join('')).toBe(EXIT.ok);
  doc = JSON.parse(readFileSync(join(dir, 'set.json'), 'utf8')) as Node;
  html = readFileSync(join(dir, 'report.html'), 'utf8');
  const stepCode = await runCli(['fit', 'fixtures/demo/tern24-step.csv', '--out', join(dir, 'step.json')], io);
  expect(stepCode, err.join('')).toBe(EXIT.ok);
  stepDoc = JSON.parse(readFileSync(join(dir, 'step.json'), 'utf8')) as Node;
}, 180_000);

/** Follows `$ref`s to the schema node they name. */
function deref(node: Node): Node {
  let n = node;
  while (typeof n.$ref === 'string') n = (schema.$defs as Record<string, Node>)[n.$ref.replace('#/$defs/', '')]!;
  return n;
}

/** The schema nodes that may describe `value` at a node (its own, `allOf`/`anyOf`/`oneOf` branches). */
function branches(node: Node): Node[] {
  const n = deref(node);
  return [n, ...(['allOf', 'anyOf', 'oneOf'] as const).flatMap((k) => ((n[k] as Node[] | undefined) ?? []).flatMap(branches))];
}

/**
 * Every key of `value` with where the schema declares it, and every declared key without a
 * description. A key is declared by name under `properties`, or by a map node (`additionalProperties`
 * with a schema) or a free-form object (no `properties`) that has a description of its own.
 */
function walk(value: unknown, node: Node, path: string, undeclared: string[], undescribed: string[], seen: Set<string>): void {
  const nodes = branches(node);
  if (Array.isArray(value)) {
    const items = nodes.map((n) => n.items as Node | undefined).find((x) => x !== undefined);
    value.forEach((v, i) => { if (items !== undefined) walk(v, items, `${path}[${i}]`, undeclared, undescribed, seen); });
    return;
  }
  if (value === null || typeof value !== 'object') return;
  for (const [key, v] of Object.entries(value)) {
    const p = `${path}.${key}`;
    const named = nodes.map((n) => (n.properties as Record<string, Node> | undefined)?.[key]).find((x) => x !== undefined);
    const map = nodes.map((n) => n.additionalProperties).find((x): x is Node => x !== null && typeof x === 'object');
    const freeForm = nodes.find((n) => n.type === 'object' && n.properties === undefined && n.additionalProperties === undefined && typeof n.description === 'string');
    const child = named ?? map;
    if (child === undefined) {
      if (freeForm === undefined) undeclared.push(p);
      continue;
    }
    const pattern = p.replace(/\[\d+\]/g, '[]');
    if (!seen.has(pattern)) {
      seen.add(pattern);
      const described = typeof child.description === 'string' || typeof deref(child).description === 'string' ||
        (named === undefined && nodes.some((n) => typeof n.description === 'string'));
      if (!described) undescribed.push(pattern);
    }
    walk(v, child, p, undeclared, undescribed, seen);
  }
}

describe('the demo parameter set against docs/parameter-set.schema.json', () => {
  it('validates', () => {
    const validate = new Ajv2020({ allErrors: true, strict: false }).compile(schema);
    const ok = validate(doc);
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
    expect(validate(stepDoc), JSON.stringify(validate.errors)).toBe(true);
  });

  it('has every key it writes declared and described in the schema (checks, modelComparison, effect constants, unsupported effects…)', () => {
    const undeclared: string[] = [];
    const undescribed: string[] = [];
    walk(doc, schema, '', undeclared, undescribed, new Set());
    walk(stepDoc, schema, '', undeclared, undescribed, new Set());
    expect(undeclared).toEqual([]);
    expect(undescribed).toEqual([]);
    // The walk reached the parts the issue named: the held-out checks, the model comparison, an effect
    // left out as unsupported (value null with its bound) and every derived figure.
    expect((doc.checks as unknown[]).length).toBe(1);
    // The demo's candidates are screened by the score test (30 000+ rows); the step run alone has
    // its candidates fitted and compared.
    expect(((doc.model as Node).candidates as Node[]).some((c) => c.scoreTest !== undefined)).toBe(true);
    expect(((stepDoc.model as Node).candidates as Node[]).some((c) => c.comparison !== null)).toBe(true);
    expect(Object.values(doc.parameters as Record<string, Node>).some((p) => p.value === null && String(p.note).startsWith('not distinguishable'))).toBe(true);
    expect(Object.keys(doc.derived as Node)).toContain('speedDropPerLoadTorqueRpm');
    // The bound of an unsupported effect is written like every other number (no 0.00000776).
    const tc = (doc.parameters as Record<string, Node>).Tc!;
    expect(String(tc.note)).toMatch(/^not distinguishable from 0 \(< \d(\.\d+)?e−\d+ N·m at 95 %\)/);
  });

  it('catches a key the schema does not declare (the walk can fail)', () => {
    const undeclared: string[] = [];
    walk({ ...doc, surprise: 1, fit: { ...(doc.fit as Node), extra: true } }, schema, '', undeclared, [], new Set());
    expect(undeclared.sort()).toEqual(['.fit.extra', '.surprise']);
  });
});

describe('the demo HTML report', () => {
  it('shows the model choice: its summary and every candidate with its test and reason', () => {
    const section = html.slice(html.indexOf('<h2>Model choice</h2>'), html.indexOf('<h2>Cautions</h2>'));
    const model = doc.model as { summary: string; candidates: { added: string | null; reason: string }[] };
    expect(section).toContain(model.summary);
    expect(model.candidates.length).toBeGreaterThan(1);
    for (const c of model.candidates) expect(section).toContain(`<td>${c.added === null ? 'lumped linear model' : `+ ${c.added}`}</td>`);
    expect(section).toMatch(/score test p \d/);
  });

  it('shows the held-out check with its NRMSE per channel', () => {
    const section = html.slice(html.indexOf('<h2>Held-out checks</h2>'), html.indexOf('<h2>Findings</h2>'));
    expect(section).toContain(HELD_OUT);
    const check = (doc.checks as { channels: { channel: string; nrmse: number }[] }[])[0]!;
    expect(check.channels.map((c) => c.channel)).toEqual(['current', 'speed']);
    for (const c of check.channels) expect(section).toContain(`<td>${c.channel}</td>`);
  });

  it('gives the sha256 of every input file, fitted and held out, as computed here', () => {
    for (const file of [...FITTED, HELD_OUT]) {
      const sha = createHash('sha256').update(readFileSync(join(repoRoot, file))).digest('hex');
      expect(html, file).toMatch(new RegExp(`<code>${file.replace(/\./g, '\\.')}</code></td><td>(fitted|held-out check)</td><td><code>${sha}</code>`));
    }
    expect(html).toContain('<td>held-out check</td>');
  });
});
