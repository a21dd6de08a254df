#!/usr/bin/env node
// Start/test plumbing for Modewright. Plain Node (no dependencies) because it
// runs before `npm install`. Commands:
//   node scripts/run.mjs start   set up everything, then serve the site with demo data
//   node scripts/run.mjs dev     same services, then Vite dev server + API with reload
//   node scripts/run.mjs test    set up a separate test database, then every test runner
//   node scripts/run.mjs db      only provision and start PostgreSQL and the dev mail catcher (for contributors)
//   node scripts/run.mjs stop    stop the private PostgreSQL cluster
//   node scripts/run.mjs native  only build the engine's OpenBLAS addon (native/), installing Debian's libraries if missing
import { spawn, spawnSync, execFileSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import net from 'node:net';
import crypto from 'node:crypto';
import { fileURLToPath } from 'node:url';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const dataDir = path.join(root, '.data');
const pgDir = path.join(dataDir, 'postgres');
const sockDir = path.join(dataDir, 'pg-socket');
const pgLog = path.join(dataDir, 'postgres.log');
const artifacts = path.join(root, 'artifacts');

export const PG_PORT = Number(process.env.MODEWRIGHT_PG_PORT ?? 5479);
const PROFILES = {
  start: { db: 'modewright', app: Number(process.env.MODEWRIGHT_PORT ?? 5480), smtp: 5481, mailHttp: 5482 },
  test: { db: 'modewright_test', e2eDb: 'modewright_e2e', app: 5490, smtp: 5491, mailHttp: 5492 },
};

const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
const log = (msg) => console.log(`[modewright] ${msg}`);
const die = (msg, code = 1) => {
  console.error(`[modewright] ${msg}`);
  process.exit(code);
};

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', cwd: root, ...opts });
  if (r.error) throw r.error;
  return r.status ?? 1;
}
function must(cmd, args, opts = {}) {
  const status = run(cmd, args, opts);
  if (status !== 0) die(`${cmd} ${args.join(' ')} failed with exit code ${status}`);
}
function which(cmd) {
  const r = spawnSync('sh', ['-c', `command -v ${cmd}`], { encoding: 'utf8' });
  return r.status === 0 ? r.stdout.trim() : null;
}

let aptUpdated = false;
function aptInstall(...pkgs) {
  if (!isRoot) die(`${pkgs.join(' ')} is missing; install it (sudo apt-get install ${pkgs.join(' ')}) and run again`);
  if (!aptUpdated) {
    log('apt-get update');
    must('apt-get', ['update', '-q']);
    aptUpdated = true;
  }
  log(`apt-get install ${pkgs.join(' ')}`);
  must('apt-get', ['install', '-y', '-q', '--no-install-recommends', ...pkgs], {
    env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' },
  });
}

// ---------------------------------------------------------------- npm packages
function ensureNpmPackages() {
  const lock = path.join(root, 'package-lock.json');
  const marker = path.join(root, 'node_modules', '.package-lock.json');
  const stale =
    !fs.existsSync(marker) || (fs.existsSync(lock) && fs.statSync(lock).mtimeMs > fs.statSync(marker).mtimeMs + 1000);
  if (!stale) return;
  log('installing npm packages (npm ci)');
  must('npm', ['ci', '--no-audit', '--no-fund']);
}

// ---------------------------------------------------------------- OpenBLAS addon
// The engine's fast backend: a plain Node-API addon in native/ on Debian's libopenblas-dev and
// liblapacke-dev, built by the node-gyp that ships with npm against the Node headers of the
// installed nodejs (--nodedir: never downloads anything). Any failure is one log line and the
// engine uses its TypeScript backend; MODEWRIGHT_LINALG=typescript skips the build.
const nativeDir = path.join(root, 'native');
export const ADDON_FILE = path.join(nativeDir, 'build', 'Release', 'modewright_linalg.node');

function blasHeadersFound() {
  const cc = which('cc') ?? which('gcc');
  if (!cc) return false;
  const r = spawnSync(cc, ['-E', '-x', 'c', '-', '-o', '/dev/null'], { input: '#include <cblas.h>\n#include <lapacke.h>\n', encoding: 'utf8' });
  return r.status === 0;
}

function nodeGypScript() {
  const candidates = [path.join(path.dirname(process.execPath), '..', 'lib', 'node_modules', 'npm', 'node_modules', 'node-gyp', 'bin', 'node-gyp.js')];
  const g = spawnSync('npm', ['root', '-g'], { encoding: 'utf8' });
  if (g.status === 0) candidates.push(path.join(g.stdout.trim(), 'npm', 'node_modules', 'node-gyp', 'bin', 'node-gyp.js'));
  candidates.push('/usr/share/nodejs/node-gyp/bin/node-gyp.js', '/usr/lib/node_modules/node-gyp/bin/node-gyp.js');
  return candidates.find((f) => fs.existsSync(f)) ?? null;
}

/** The prefix whose include/node holds this Node's headers (Debian's nodejs ships them in /usr/include/node). */
function nodeHeadersDir() {
  const candidates = [path.resolve(path.dirname(process.execPath), '..'), '/usr', '/usr/local'];
  return candidates.find((d) => fs.existsSync(path.join(d, 'include', 'node', 'node_api.h'))) ?? null;
}

function addonLoads() {
  const r = spawnSync(process.execPath, ['-e', `process.stdout.write(require(${JSON.stringify(ADDON_FILE)}).config())`], { encoding: 'utf8' });
  return r.status === 0 ? { ok: true, config: r.stdout.trim() } : { ok: false, error: (r.stderr.trim().split('\n').find((l) => /Error/.test(l)) ?? r.stderr.trim()).slice(0, 300) };
}

function addonFresh() {
  if (!fs.existsSync(ADDON_FILE)) return false;
  const built = fs.statSync(ADDON_FILE).mtimeMs;
  return fs.readdirSync(nativeDir).filter((f) => /\.(c|h|gyp)$/.test(f)).every((f) => fs.statSync(path.join(nativeDir, f)).mtimeMs <= built);
}

/** Build (when missing or stale) and load-check the addon. Returns true when the OpenBLAS backend can run; never exits. */
export function ensureNativeAddon() {
  const fallback = (why) => {
    log(`OpenBLAS addon not available (${why}); the engine uses its TypeScript backend`);
    return false;
  };
  if ((process.env.MODEWRIGHT_LINALG ?? '').trim().toLowerCase() === 'typescript') {
    log('MODEWRIGHT_LINALG=typescript: the OpenBLAS addon is not built');
    return false;
  }
  try {
    if (!blasHeadersFound()) {
      if (!isRoot || !which('apt-get')) return fallback('cblas.h/lapacke.h not found; install libopenblas-dev and liblapacke-dev');
      log('apt-get install libopenblas-dev liblapacke-dev');
      const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
      let r = spawnSync('apt-get', ['install', '-y', '-q', '--no-install-recommends', 'libopenblas-dev', 'liblapacke-dev'], { stdio: 'inherit', env });
      if (r.status !== 0 && !aptUpdated) {
        spawnSync('apt-get', ['update', '-q'], { stdio: 'inherit', env });
        aptUpdated = true;
        r = spawnSync('apt-get', ['install', '-y', '-q', '--no-install-recommends', 'libopenblas-dev', 'liblapacke-dev'], { stdio: 'inherit', env });
      }
      if (r.status !== 0 || !blasHeadersFound()) return fallback('apt-get could not install libopenblas-dev and liblapacke-dev');
    }
    if (!addonFresh()) {
      const gyp = nodeGypScript();
      if (!gyp) return fallback('node-gyp (shipped with npm) not found');
      const nodedir = nodeHeadersDir();
      if (!nodedir) return fallback(`the Node headers (include/node/node_api.h) were not found next to ${process.execPath} nor in /usr; install the nodejs headers`);
      log(`building the OpenBLAS addon (node-gyp, headers from ${nodedir}/include/node)`);
      const r = spawnSync(process.execPath, [gyp, 'rebuild', `--nodedir=${nodedir}`], {
        cwd: nativeDir,
        encoding: 'utf8',
        env: { ...process.env, npm_config_nodedir: nodedir, npm_config_offline: 'true' },
      });
      if (r.status !== 0) {
        const detail = `${r.stdout}\n${r.stderr}`.split('\n').filter((l) => /error|Error/.test(l)).slice(0, 3).join(' | ');
        return fallback(`node-gyp failed: ${detail.slice(0, 400) || `exit code ${r.status}`}`);
      }
    }
    const loaded = addonLoads();
    if (!loaded.ok) return fallback(`built but does not load: ${loaded.error}`);
    log(`OpenBLAS addon ready (${loaded.config})`);
    return true;
  } catch (err) {
    return fallback(err?.message ?? String(err));
  }
}

// ---------------------------------------------------------------- PostgreSQL
function pgBinDir() {
  const candidates = [];
  const onPath = which('pg_ctl');
  if (onPath && which('initdb')) candidates.push(path.dirname(fs.realpathSync(onPath)));
  const cfg = spawnSync('pg_config', ['--bindir'], { encoding: 'utf8' });
  if (cfg.status === 0) candidates.push(cfg.stdout.trim());
  const base = '/usr/lib/postgresql';
  if (fs.existsSync(base)) {
    for (const v of fs.readdirSync(base).sort((a, b) => Number(b) - Number(a))) candidates.push(path.join(base, v, 'bin'));
  }
  return candidates.find((d) => fs.existsSync(path.join(d, 'pg_ctl')) && fs.existsSync(path.join(d, 'initdb'))) ?? null;
}

function ensurePostgresInstalled() {
  let bin = pgBinDir();
  if (!bin) {
    aptInstall('postgresql');
    bin = pgBinDir();
  }
  if (!bin) die('PostgreSQL was installed but pg_ctl/initdb were not found (looked on PATH, pg_config --bindir, /usr/lib/postgresql/*/bin)');
  return bin;
}

/** Run a PostgreSQL server binary as the `postgres` OS user when we are root (initdb refuses root). */
function pgCmd(bin, tool, args, opts = {}) {
  const exe = path.join(bin, tool);
  if (isRoot) return spawnSync('runuser', ['-u', 'postgres', '--', exe, ...args], { encoding: 'utf8', cwd: '/', ...opts });
  return spawnSync(exe, args, { encoding: 'utf8', cwd: root, ...opts });
}

/** The postgres user must be able to reach .data; a fresh clone may sit under a private (0700) temp folder. */
function ensureTraversable(dir) {
  if (!isRoot) return;
  const chain = [];
  for (let d = dir; ; d = path.dirname(d)) {
    chain.push(d);
    if (d === path.dirname(d)) break;
  }
  for (const d of chain.reverse()) {
    const mode = fs.statSync(d).mode;
    if ((mode & 0o001) === 0) {
      log(`allowing the postgres user to pass through ${d} (chmod o+x)`);
      fs.chmodSync(d, mode | 0o001);
    }
  }
}

function pgRunning(bin) {
  if (!fs.existsSync(path.join(pgDir, 'PG_VERSION'))) return false;
  return pgCmd(bin, 'pg_ctl', ['-D', pgDir, 'status']).status === 0;
}

async function ensureCluster() {
  const bin = ensurePostgresInstalled();
  fs.mkdirSync(dataDir, { recursive: true });
  ensureTraversable(dataDir);
  if (!fs.existsSync(path.join(pgDir, 'PG_VERSION'))) {
    log(`creating a private PostgreSQL cluster in ${path.relative(root, pgDir)}`);
    fs.mkdirSync(pgDir, { recursive: true, mode: 0o700 });
    if (isRoot) execFileSync('chown', ['-R', 'postgres:postgres', pgDir]);
    const r = pgCmd(bin, 'initdb', ['-D', pgDir, '-U', 'postgres', '--auth=trust', '--encoding=UTF8', '--locale=C.UTF-8']);
    if (r.status !== 0) die(`initdb failed:\n${r.stdout}\n${r.stderr}`);
  }
  fs.mkdirSync(sockDir, { recursive: true });
  if (isRoot) execFileSync('chown', ['postgres:postgres', sockDir]);
  let startedHere = false;
  if (!pgRunning(bin)) {
    if (await portInUse(PG_PORT)) die(`port ${PG_PORT} is taken by another program; set MODEWRIGHT_PG_PORT to a free port`);
    log(`starting PostgreSQL on 127.0.0.1:${PG_PORT}`);
    if (isRoot) {
      fs.writeFileSync(pgLog, '');
      execFileSync('chown', ['postgres:postgres', pgLog]);
    }
    // PostgreSQL's durable defaults (fsync, full_page_writes, synchronous_commit on): this cluster holds
    // real course data. Test databases get their speed-up per database (see ensureDatabase).
    const r = pgCmd(bin, 'pg_ctl', [
      '-D', pgDir, '-l', pgLog, '-w', '-t', '60',
      '-o', `-p ${PG_PORT} -h 127.0.0.1 -k ${sockDir}`,
      'start',
    ]);
    if (r.status !== 0) die(`PostgreSQL did not start (see ${pgLog}):\n${r.stdout}\n${r.stderr}`);
    startedHere = true;
  }
  return { bin, startedHere };
}

function stopCluster(bin) {
  if (!pgRunning(bin)) return;
  log('stopping PostgreSQL');
  pgCmd(bin, 'pg_ctl', ['-D', pgDir, '-m', 'fast', '-w', 'stop']);
}

const dbUrl = (db) => `postgres://postgres@127.0.0.1:${PG_PORT}/${db}`;

/**
 * Create the database if missing. `scratch` marks a test database whose contents are thrown away:
 * its commits do not wait for the WAL flush (synchronous_commit is the one durability setting
 * PostgreSQL allows per database; a crash loses the last moments of it but never corrupts it, and
 * fsync/full_page_writes stay on for the whole cluster, which also holds the real data).
 */
async function ensureDatabase(db, { fresh = false, scratch = false } = {}) {
  const { default: pg } = await import('pg');
  const client = new pg.Client({ connectionString: dbUrl('postgres') });
  await client.connect();
  try {
    if (fresh) await client.query(`DROP DATABASE IF EXISTS "${db}" WITH (FORCE)`);
    const { rowCount } = await client.query('SELECT 1 FROM pg_database WHERE datname = $1', [db]);
    if (!rowCount) {
      await client.query(`CREATE DATABASE "${db}"`);
      log(`created database ${db}`);
    }
    if (scratch) await client.query(`ALTER DATABASE "${db}" SET synchronous_commit = off`);
    else {
      // A cluster started by an older run.mjs may still run without fsync; say so once.
      const { rows } = await client.query("SELECT name FROM pg_settings WHERE name IN ('fsync', 'full_page_writes') AND setting = 'off'");
      if (rows.length) log(`warning: the running PostgreSQL has ${rows.map((r) => r.name).join(' and ')} off; restart it (node scripts/run.mjs stop) so ${db} is crash-safe`);
    }
  } finally {
    await client.end();
  }
}

// ---------------------------------------------------------------- helpers
function portInUse(port) {
  return new Promise((resolve) => {
    const s = net.connect({ host: '127.0.0.1', port });
    s.once('connect', () => {
      s.destroy();
      resolve(true);
    });
    s.once('error', () => resolve(false));
  });
}

async function waitForPort(port, child, label, timeoutMs = 60_000) {
  const t0 = Date.now();
  while (Date.now() - t0 < timeoutMs) {
    if (child && child.exitCode !== null) die(`${label} exited early with code ${child.exitCode}`);
    if (await portInUse(port)) return;
    await new Promise((r) => setTimeout(r, 200));
  }
  die(`${label} did not open port ${port} within ${timeoutMs / 1000} s`);
}

const tsx = path.join(root, 'node_modules', '.bin', 'tsx');
const children = new Set();
function startChild(label, args, env) {
  const child = spawn(tsx, args, { cwd: root, env: { ...process.env, ...env }, stdio: 'inherit' });
  children.add(child);
  child.on('exit', () => children.delete(child));
  child.label = label;
  return child;
}
function stopChildren() {
  return Promise.all(
    [...children].map(
      (c) =>
        new Promise((resolve) => {
          if (c.exitCode !== null) return resolve();
          c.once('exit', resolve);
          c.kill('SIGTERM');
          setTimeout(() => c.kill('SIGKILL'), 8000).unref();
        }),
    ),
  );
}

function sessionSecret() {
  if (process.env.SESSION_SECRET) return process.env.SESSION_SECRET;
  const file = path.join(dataDir, 'session-secret');
  if (!fs.existsSync(file)) fs.writeFileSync(file, crypto.randomBytes(32).toString('hex'), { mode: 0o600 });
  return fs.readFileSync(file, 'utf8').trim();
}

function mailEnv(p) {
  return { SMTP_HOST: '127.0.0.1', SMTP_PORT: String(p.smtp), MAIL_CATCHER_URL: `http://127.0.0.1:${p.mailHttp}` };
}

async function startMailCatcher(p) {
  if (await portInUse(p.smtp)) {
    // A catcher left running by `node scripts/run.mjs db` is ours: reuse it.
    const ours = await fetch(`http://127.0.0.1:${p.mailHttp}/messages`).then((r) => r.ok).catch(() => false);
    if (ours) return null;
    die(`port ${p.smtp} (mail catcher) is used by another program`);
  }
  const c = startChild('mail catcher', ['scripts/mail-catcher.ts'], {
    MAIL_SMTP_PORT: String(p.smtp),
    MAIL_HTTP_PORT: String(p.mailHttp),
  });
  await waitForPort(p.mailHttp, c, 'mail catcher');
  return c;
}

// A second `npm start` while one runs says so instead of corrupting anything.
function takeLock(name) {
  const file = path.join(dataDir, `${name}.pid`);
  if (fs.existsSync(file)) {
    const pid = Number(fs.readFileSync(file, 'utf8'));
    let alive = false;
    try {
      process.kill(pid, 0);
      alive = pid !== process.pid;
    } catch {
      alive = false;
    }
    if (alive) die(`Modewright is already running here (process ${pid}). Stop it with Ctrl-C in its terminal first.`, 3);
  }
  fs.mkdirSync(dataDir, { recursive: true });
  fs.writeFileSync(file, String(process.pid));
  return () => {
    try {
      if (Number(fs.readFileSync(file, 'utf8')) === process.pid) fs.unlinkSync(file);
    } catch {
      /* already gone */
    }
  };
}

// ---------------------------------------------------------------- commands
async function cmdDb() {
  ensureNpmPackages();
  await ensureCluster();
  await ensureDatabase('modewright');
  await ensureDatabase('modewright_test', { scratch: true });
  const p = PROFILES.start;
  if (!(await portInUse(p.mailHttp))) {
    const out = fs.openSync(path.join(dataDir, 'mail-catcher.log'), 'a');
    const c = spawn(tsx, ['scripts/mail-catcher.ts'], {
      cwd: root,
      env: { ...process.env, MAIL_SMTP_PORT: String(p.smtp), MAIL_HTTP_PORT: String(p.mailHttp) },
      stdio: ['ignore', out, out],
      detached: true,
    });
    c.unref();
    await waitForPort(p.mailHttp, null, 'mail catcher');
  }
  console.log(`DATABASE_URL=${dbUrl('modewright')}`);
  console.log(`TEST_DATABASE_URL=${dbUrl('modewright_test')}`);
  for (const [k, v] of Object.entries(mailEnv(p))) console.log(`${k}=${v}`);
}

async function cmdStart({ dev = false } = {}) {
  ensureNpmPackages();
  ensureNativeAddon();
  fs.mkdirSync(dataDir, { recursive: true });
  const release = takeLock('start');
  const p = PROFILES.start;
  if (await portInUse(p.app)) die(`port ${p.app} is in use; set MODEWRIGHT_PORT to a free port`);
  const { bin, startedHere } = await ensureCluster();
  let stopping = false;
  const shutdown = async (code = 0) => {
    if (stopping) return;
    stopping = true;
    log('shutting down');
    await stopChildren();
    if (startedHere) stopCluster(bin);
    release();
    process.exit(code);
  };
  process.on('SIGINT', () => void shutdown(0));
  process.on('SIGTERM', () => void shutdown(0));
  await ensureDatabase(p.db);
  await startMailCatcher(p);
  const env = {
    DATABASE_URL: dbUrl(p.db),
    MODEWRIGHT_PORT: String(p.app),
    SESSION_SECRET: sessionSecret(),
    MODEWRIGHT_SEED: '1',
    ...mailEnv(p),
  };
  if (dev) {
    const api = startChild('api', ['watch', 'server/main.ts'], { ...env, NODE_ENV: 'development' });
    await waitForPort(p.app, api, 'API server', 120_000);
    const vite = spawn(path.join(root, 'node_modules', '.bin', 'vite'), [], { cwd: root, stdio: 'inherit', env: { ...process.env, ...env } });
    children.add(vite);
  } else {
    log('building the client');
    if (run(path.join(root, 'node_modules', '.bin', 'vite'), ['build', '--logLevel', 'warn']) !== 0) await shutdown(1);
    const server = startChild('server', ['server/main.ts'], { ...env, NODE_ENV: 'production' });
    server.on('exit', (code) => {
      if (!stopping) {
        log(`the server stopped (exit code ${code})`);
        void shutdown(code ?? 1);
      }
    });
    await waitForPort(p.app, server, 'server', 120_000);
    log(`open http://127.0.0.1:${p.app} (demo accounts in README.md); Ctrl-C stops the site and PostgreSQL`);
  }
}

/** Read a Vitest JSON report into counts. */
function vitestCounts(file) {
  try {
    const j = JSON.parse(fs.readFileSync(file, 'utf8'));
    return { passed: j.numPassedTests ?? 0, failed: (j.numFailedTests ?? 0) + (j.success === false && !j.numFailedTests ? 1 : 0), skipped: j.numPendingTests + (j.numTodoTests ?? 0) };
  } catch {
    return { passed: 0, failed: 1, skipped: 0, missing: true };
  }
}

async function cmdTest() {
  const t0 = Date.now();
  ensureNpmPackages();
  const openblas = ensureNativeAddon();
  fs.mkdirSync(artifacts, { recursive: true });
  const p = PROFILES.test;
  const totals = { passed: 0, failed: 0, skipped: 0 };
  const lines = [];
  const record = (name, c) => {
    totals.passed += c.passed;
    totals.failed += c.failed;
    totals.skipped += c.skipped ?? 0;
    lines.push(`  ${name.padEnd(12)} ${c.passed} passed, ${c.failed} failed${c.skipped ? `, ${c.skipped} skipped` : ''}${c.missing ? ' (runner produced no report)' : ''}`);
  };
  const check = (name, cmd, args) => {
    log(`${name}: ${[cmd, ...args].join(' ')}`);
    const ok = run(cmd, args) === 0;
    record(name, { passed: ok ? 1 : 0, failed: ok ? 0 : 1 });
  };
  const bin = path.join(root, 'node_modules', '.bin');

  check('typecheck', path.join(bin, 'tsc'), ['-p', 'tsconfig.json', '--noEmit']);
  check('lint', path.join(bin, 'eslint'), ['.', '--max-warnings', '0']);

  const { bin: pgbin, startedHere } = await ensureCluster();
  let exitCode = 0;
  try {
    await ensureDatabase(p.db, { fresh: true, scratch: true });
    await ensureDatabase(p.e2eDb, { fresh: true, scratch: true });
    await startMailCatcher(p);
    const env = {
      ...process.env,
      NODE_ENV: 'test',
      DATABASE_URL: dbUrl(p.db),
      SESSION_SECRET: 'test-secret-' + crypto.randomBytes(8).toString('hex'),
      BCRYPT_ROUNDS: '4',
      ...mailEnv(p),
      // The addon was built: its tests must run, not skip.
      ...(openblas ? { MODEWRIGHT_REQUIRE_OPENBLAS: '1' } : {}),
    };
    const unitReport = path.join(artifacts, 'vitest-unit-api.json');
    fs.rmSync(unitReport, { force: true });
    log('vitest: unit and API tests');
    run(path.join(bin, 'vitest'), ['run', '--project', 'unit', '--project', 'api', '--reporter=default', '--reporter=json', `--outputFile.json=${unitReport}`], { env });
    record('unit+api', vitestCounts(unitReport));
    if (openblas) {
      // The engine's tests above ran on the OpenBLAS backend; run them again on the TypeScript one.
      const tsReport = path.join(artifacts, 'vitest-engine-typescript.json');
      fs.rmSync(tsReport, { force: true });
      log('vitest: engine tests again on the TypeScript backend (MODEWRIGHT_LINALG=typescript)');
      run(path.join(bin, 'vitest'), ['run', '--project', 'unit', 'tests/unit/engine', 'tests/unit/linalg', '--reporter=default', '--reporter=json', `--outputFile.json=${tsReport}`], {
        env: { ...env, MODEWRIGHT_LINALG: 'typescript' },
      });
      record('engine (ts)', vitestCounts(tsReport));
    }

    // Browser smoke test against the built site on a fresh, seeded database.
    if (!fs.existsSync(process.env.CHROMIUM_PATH ?? '/usr/bin/chromium')) aptInstall('chromium');
    log('building the client for the browser test');
    const built = run(path.join(bin, 'vite'), ['build', '--logLevel', 'warn']) === 0;
    const e2eReport = path.join(artifacts, 'vitest-e2e.json');
    fs.rmSync(e2eReport, { force: true });
    if (built) {
      if (await portInUse(p.app)) die(`port ${p.app} (test server) is in use`);
      const server = startChild('test server', ['server/main.ts'], {
        ...env,
        DATABASE_URL: dbUrl(p.e2eDb),
        MODEWRIGHT_PORT: String(p.app),
        MODEWRIGHT_SEED: '1',
        BCRYPT_ROUNDS: '4',
      });
      await waitForPort(p.app, server, 'test server', 120_000);
      log('vitest: browser smoke test');
      run(path.join(bin, 'vitest'), ['run', '--project', 'e2e', '--reporter=default', '--reporter=json', `--outputFile.json=${e2eReport}`], {
        env: { ...env, E2E_BASE_URL: `http://127.0.0.1:${p.app}` },
      });
    }
    record('e2e', built ? vitestCounts(e2eReport) : { passed: 0, failed: 1 });
  } finally {
    await stopChildren();
    if (startedHere) stopCluster(pgbin);
  }
  if (totals.failed > 0) exitCode = 1;
  const secs = ((Date.now() - t0) / 1000).toFixed(0);
  console.log(`\nTest summary (${secs} s):\n${lines.join('\n')}`);
  const summary = `${totals.passed} passed, ${totals.failed} failed${totals.skipped ? `, ${totals.skipped} skipped` : ''}`;
  fs.writeFileSync(path.join(artifacts, 'test-summary.txt'), summary + '\n');
  console.log(summary);
  process.exit(exitCode);
}

async function cmdStop() {
  const bin = ensurePostgresInstalled();
  stopCluster(bin);
}

const cmd = process.argv[2];
async function cmdNative() {
  if (!ensureNativeAddon()) process.exitCode = 1;
}

const commands = { start: () => cmdStart(), dev: () => cmdStart({ dev: true }), test: cmdTest, db: cmdDb, stop: cmdStop, native: cmdNative };
if (!commands[cmd]) die(`usage: node scripts/run.mjs ${Object.keys(commands).join('|')}`, 2);
commands[cmd]().catch((e) => die(e?.stack ?? String(e)));
