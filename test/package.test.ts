/**
 * The packages as another tool gets them: packed, installed from the tarballs into an empty npm
 * project outside the repository, and used from plain Node ESM, from TypeScript (NodeNext, strict,
 * no skipLibCheck) and through the `twinfet` bin.
 *
 * The tarballs are packed from a fresh build of the sources in a staging copy of the workspace,
 * so outputs of deleted sources left in the repository's dist/ cannot slip into them, and the
 * repository's own build is never touched while other test files use it. npm fetches the
 * third-party dependencies (and typescript, @types/node for the TypeScript consumer) from its
 * registry. Without npm on the PATH the whole file is skipped and says so.
 */
import { spawnSync, type SpawnSyncReturns } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, realpathSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { twoSidedTail } from '@twinfet/montecarlo';

const REPO = fileURLToPath(new URL('..', import.meta.url));
const PACKAGES = ['core', 'montecarlo', 'cli'] as const;
/** The versions the repository builds with (package.json devDependencies). */
const TYPESCRIPT = '5.9.3';
const TYPES_NODE = '20.19.43';

const npm = spawnSync('npm', ['--version'], { encoding: 'utf8' });
const npmVersion = npm.status === 0 ? npm.stdout.trim() : null;
if (npmVersion === null) {
  console.warn('test/package.test.ts SKIPPED: npm is not on the PATH, so the packed packages cannot be installed and checked');
}

/** Runs a command, failing with its output when it does not exit 0. */
function run(cmd: string, args: readonly string[], cwd: string, timeoutMs = 300_000): SpawnSyncReturns<string> {
  const r = spawnSync(cmd, args, { cwd, encoding: 'utf8', timeout: timeoutMs, env: { ...process.env, npm_config_audit: 'false', npm_config_fund: 'false', npm_config_update_notifier: 'false' } });
  if (r.status !== 0) {
    throw new Error(`${cmd} ${args.join(' ')} (in ${cwd}) exited ${String(r.status ?? r.signal)}:\n${r.stdout}\n${r.stderr}${r.error === undefined ? '' : `\n${r.error.message}`}`);
  }
  return r;
}

/** A copy of the workspace's manifests and sources whose node_modules point at the repository's installed dependencies. */
function stageWorkspace(stage: string): void {
  for (const f of ['package.json', 'pnpm-workspace.yaml', 'tsconfig.base.json', 'tsconfig.json']) cpSync(join(REPO, f), join(stage, f));
  symlinkSync(join(REPO, 'node_modules'), join(stage, 'node_modules'));
  for (const p of PACKAGES) {
    const from = join(REPO, 'packages', p);
    const to = join(stage, 'packages', p);
    mkdirSync(to, { recursive: true });
    for (const f of ['package.json', 'tsconfig.json', 'src', 'bin']) if (existsSync(join(from, f))) cpSync(join(from, f), join(to, f), { recursive: true });
    const modules = join(to, 'node_modules');
    mkdirSync(modules);
    for (const entry of readdirSync(join(from, 'node_modules'))) {
      if (entry === '.bin') continue;
      if (!entry.startsWith('@')) {
        symlinkSync(realpathSync(join(from, 'node_modules', entry)), join(modules, entry));
        continue;
      }
      mkdirSync(join(modules, entry));
      for (const name of readdirSync(join(from, 'node_modules', entry))) {
        // The workspace's own packages link to the staged copies, everything else to the installed one.
        const target = entry === '@twinfet' ? join(stage, 'packages', name) : realpathSync(join(from, 'node_modules', entry, name));
        symlinkSync(target, join(modules, entry, name));
      }
    }
  }
}

interface PackedManifest {
  readonly name: string;
  readonly dependencies?: Record<string, string>;
  readonly bin?: Record<string, string>;
}

interface ConsumerOutput {
  readonly cliExports: readonly string[];
  readonly sigmaLin: number;
  readonly sigma: number;
  readonly sigmaInterval: readonly [number, number];
  readonly evaluated: number;
  readonly workers: number;
  readonly progressCalls: number;
  readonly lastProgress: readonly [number, number];
  readonly abortError: string;
  readonly tail: { readonly method: string; readonly p: number; readonly se: number };
  readonly sized: { readonly met: boolean; readonly sigmaHi: number | null; readonly target: number; readonly areaRatio: number };
}

/** What every consumer run must show (both consumers run the same calls). */
function checkConsumer(o: ConsumerOutput): void {
  expect(o.cliExports).toEqual(['function', 'function']);
  // simulate: the linear pair's offset is Gaussian with the linearised sigma, so the Monte Carlo
  // sigma lies within 4 standard errors sigma / sqrt(2 (N - 1)) of it (normal-theory SE).
  expect(o.evaluated).toBe(200_000);
  expect(Math.abs(o.sigma - o.sigmaLin)).toBeLessThan((4 * o.sigmaLin) / Math.sqrt(2 * (o.evaluated - 1)));
  expect(o.sigmaInterval[0]).toBeLessThan(o.sigma);
  expect(o.sigmaInterval[1]).toBeGreaterThan(o.sigma);
  // Two worker threads: the pool ran the worker entry shipped in the tarball.
  expect(o.workers).toBe(2);
  expect(o.progressCalls).toBeGreaterThan(0);
  expect(o.lastProgress).toEqual([200_000, 200_000]);
  expect(o.abortError).toBe('AbortError');
  // estimateHighSigma at 6 sigma: within 4 standard errors of 2 Phi(-6) = 1.973175290e-9
  // (Abramowitz & Stegun 1964, ch. 26).
  expect(o.tail.method).toBe('importance-sampling');
  expect(Math.abs(o.tail.p - twoSidedTail(6))).toBeLessThan(4 * o.tail.se);
  // sizeDesign for half the sigma at fixed W/L: W L grows by (1/2)^-2 = 4 (Pelgrom 1989), a little
  // more once rounded up and confirmed (the upper end of the sigma interval must meet the target;
  // each refinement adds about twice the interval's ~1% half-width to sigma, 4-8% to the area).
  expect(o.sized.met).toBe(true);
  expect(o.sized.sigmaHi!).toBeLessThanOrEqual(o.sized.target);
  expect(o.sized.areaRatio).toBeGreaterThanOrEqual(4 * (1 - 1e-9));
  expect(o.sized.areaRatio).toBeLessThan(4.5);
}

const lastJsonLine = (stdout: string): ConsumerOutput => JSON.parse(stdout.trimEnd().split('\n').at(-1)!) as ConsumerOutput;

describe.skipIf(npmVersion === null)(`the packages installed from their tarballs outside the repository (npm ${npmVersion ?? 'missing'})`, () => {
  let root = '';
  let tarballs = '';
  let consumer = '';

  beforeAll(() => {
    root = mkdtempSync(join(tmpdir(), 'twinfet-package-'));
    const stage = join(root, 'workspace');
    mkdirSync(stage);
    stageWorkspace(stage);
    run(process.execPath, [join(REPO, 'node_modules/typescript/bin/tsc'), '-b', join(stage, 'tsconfig.json')], stage);
    tarballs = join(root, 'tarballs');
    mkdirSync(tarballs);
    // pnpm pack turns the workspace: ranges into the packages' versions.
    for (const p of PACKAGES) run('npx', ['--yes', 'pnpm@12.4.2', 'pack', '--pack-destination', tarballs], join(stage, 'packages', p));
    consumer = join(root, 'consumer');
    mkdirSync(consumer);
    writeFileSync(join(consumer, 'package.json'), `${JSON.stringify({ name: 'twinfet-consumer', private: true, type: 'module' }, null, 2)}\n`);
    const files = readdirSync(tarballs).map((f) => join(tarballs, f));
    run('npm', ['install', '--prefer-offline', '--no-audit', '--no-fund', ...files, `typescript@${TYPESCRIPT}`, `@types/node@${TYPES_NODE}`], consumer, 600_000);
    for (const f of ['consumer.mjs', 'consumer.ts', 'tsconfig.consumer.json']) cpSync(join(REPO, 'test/package', f), join(consumer, f));
  }, 900_000);

  afterAll(() => {
    if (root !== '') rmSync(root, { recursive: true, force: true });
  });

  it('each tarball has real version ranges, the built JS, the types and the worker entry, and nothing stale', () => {
    const names = readdirSync(tarballs).sort();
    expect(names).toEqual(['twinfet-cli-0.1.0.tgz', 'twinfet-core-0.1.0.tgz', 'twinfet-montecarlo-0.1.0.tgz']);
    for (const file of names) {
      const path = join(tarballs, file);
      const list = run('tar', ['-tzf', path], root).stdout.trim().split('\n');
      const manifest = JSON.parse(run('tar', ['-xOzf', path, 'package/package.json'], root).stdout) as PackedManifest;
      const text = JSON.stringify(manifest);
      expect(text).not.toContain('workspace:');
      for (const [dep, range] of Object.entries(manifest.dependencies ?? {})) {
        if (dep.startsWith('@twinfet/')) expect(range).toBe('^0.1.0');
      }
      expect(list).toContain('package/dist/index.js');
      expect(list).toContain('package/dist/index.d.ts');
      expect(list.some((f) => f.endsWith('.tsbuildinfo'))).toBe(false);
      expect(list.some((f) => f.includes('/test/'))).toBe(false);
      // Every built file comes from a source file of this build (none left from deleted modules).
      for (const f of list.filter((x) => x.startsWith('package/dist/') && x.endsWith('.js'))) {
        expect(list).toContain(f.replace('package/dist/', 'package/src/').replace(/\.js$/, '.ts'));
      }
      if (manifest.name === '@twinfet/montecarlo') expect(list).toContain('package/dist/engine/worker.js');
      if (manifest.name === '@twinfet/cli') {
        expect(manifest.bin).toEqual({ twinfet: './bin/twinfet.js' });
        expect(list).toContain('package/bin/twinfet.js');
      }
    }
  });

  it('plain Node ESM: parseDesign, simulate with progress and an AbortSignal on worker threads, estimateHighSigma, sizeDesign', () => {
    checkConsumer(lastJsonLine(run(process.execPath, ['consumer.mjs'], consumer).stdout));
  }, 300_000);

  it('TypeScript (NodeNext, strict, exactOptionalPropertyTypes, no skipLibCheck) compiles against the published types and runs', () => {
    const tsc = run(process.execPath, [join(consumer, 'node_modules/typescript/bin/tsc'), '-p', 'tsconfig.consumer.json'], consumer);
    expect(tsc.stdout + tsc.stderr).toBe('');
    checkConsumer(lastJsonLine(run(process.execPath, ['out/consumer.js'], consumer).stdout));
  }, 300_000);

  it('the twinfet bin runs from the installed package: npx twinfet --version and a design file', () => {
    expect(run('npx', ['--no-install', 'twinfet', '--version'], consumer).stdout.trim()).toBe('0.1.0');
    const design = join(consumer, 'demo.yaml');
    writeFileSync(design, readFileSync(join(REPO, 'examples/comparator-demo.yaml'), 'utf8'));
    const inspect = run('npx', ['--no-install', 'twinfet', 'inspect', design, '--json'], consumer);
    // The demo's linearised sigma, as `twinfet inspect` prints it in the repository: 3.850 mV.
    const j = JSON.parse(inspect.stdout) as { analytic: { sigma: number } };
    expect(Math.abs(j.analytic.sigma / 3.85e-3 - 1)).toBeLessThan(2e-3);
  }, 120_000);
});
