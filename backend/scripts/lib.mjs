// Helpers shared by `npm start`, `npm test`, `npm run dev` and `npm run bench`.
// Node built-ins only: these run before the npm dependencies are installed.
import { execFileSync, spawn, spawnSync } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
export const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;

export function log(msg) {
  process.stdout.write(`\x1b[38;5;130m[cellarwright]\x1b[0m ${msg}\n`);
}

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: 'inherit', ...opts });
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} exited with ${r.status}`);
}

/**
 * Install npm dependencies when node_modules is missing or older than the lock file; the development
 * ones too, even with NODE_ENV=production, since the build and the tests need them.
 */
export function ensureNodeModules() {
  const marker = path.join(root, 'node_modules', '.package-lock.json');
  const lock = path.join(root, 'package-lock.json');
  const stale = !fs.existsSync(marker) || (fs.existsSync(lock) && fs.statSync(lock).mtimeMs > fs.statSync(marker).mtimeMs + 1000);
  if (!stale) return;
  log('installing npm dependencies…');
  run('npm', [fs.existsSync(lock) ? 'ci' : 'install', '--include=dev', '--no-audit', '--no-fund'], { cwd: root });
}

let aptUpdated = false;
/** Install Debian packages when a file they provide is missing (needs root or password-less sudo). */
export function ensureDebian(packages, probeFile) {
  if (fs.existsSync(probeFile)) return;
  const sudo = isRoot ? [] : ['sudo', '-n'];
  log(`installing ${packages.join(', ')} from Debian's packages…`);
  const exec = (args) => (sudo.length ? run(sudo[0], [...sudo.slice(1), ...args]) : run(args[0], args.slice(1)));
  process.env.DEBIAN_FRONTEND = 'noninteractive';
  try {
    if (!aptUpdated) {
      exec(['apt-get', 'update', '-q']);
      aptUpdated = true;
    }
    exec(['apt-get', 'install', '-y', '-q', '--no-install-recommends', ...packages]);
  } catch (err) {
    throw new Error(`could not install ${packages.join(' ')} (${err.message}); install them by hand, as root: apt-get install ${packages.join(' ')}`);
  }
}

/** Debian's nginx, the load balancer in front of several instances (the instances test and benchmark); its binary. */
export function nginxBin() {
  ensureDebian(['nginx'], '/usr/sbin/nginx');
  return '/usr/sbin/nginx';
}

export function pgBinDir() {
  const base = '/usr/lib/postgresql';
  const pick = () => {
    if (!fs.existsSync(base)) return null;
    const versions = fs
      .readdirSync(base)
      .filter((v) => fs.existsSync(path.join(base, v, 'bin', 'initdb')))
      .sort((a, b) => Number(b) - Number(a));
    return versions.length ? path.join(base, versions[0], 'bin') : null;
  };
  let dir = pick();
  if (!dir) {
    ensureDebian(['postgresql', 'postgresql-contrib'], '/usr/lib/postgresql/15/bin/initdb');
    dir = pick();
  }
  if (!dir) throw new Error('PostgreSQL binaries not found under /usr/lib/postgresql');
  return dir;
}

/** Run a PostgreSQL binary as the postgres system user when we are root (it refuses to run as root). */
function pgExec(bin, args, opts = {}) {
  const full = path.join(pgBinDir(), bin);
  if (isRoot) return run('runuser', ['-u', 'postgres', '--', full, ...args], opts);
  return run(full, args, opts);
}

/** pgExec without blocking the event loop (for a caller that keeps serving or measuring meanwhile). */
function pgExecAsync(bin, args) {
  const full = path.join(pgBinDir(), bin);
  const [cmd, argv] = isRoot ? ['runuser', ['-u', 'postgres', '--', full, ...args]] : [full, args];
  return new Promise((resolve, reject) => {
    const child = spawn(cmd, argv, { stdio: ['ignore', 'ignore', 'inherit'] });
    child.on('error', reject);
    child.on('exit', (code) => (code === 0 ? resolve() : reject(new Error(`${bin} ${args.join(' ')} exited with ${code}`))));
  });
}

function canPostgresEnter(dir) {
  if (!isRoot) return true;
  return spawnSync('runuser', ['-u', 'postgres', '--', 'test', '-w', dir]).status === 0;
}

export function freePort() {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.unref();
    srv.on('error', reject);
    srv.listen(0, '127.0.0.1', () => {
      const { port } = srv.address();
      srv.close(() => resolve(port));
    });
  });
}

/**
 * A PostgreSQL cluster in `dataDir`, started on 127.0.0.1:`port`. As root the folder belongs to the
 * postgres user; when that user cannot reach the folder (a checkout under /root, say) the cluster
 * lives under /var/lib/postgresql and `dataDir` becomes a link to it.
 */
export async function startPostgres({ dataDir, port, throwaway = false }) {
  fs.mkdirSync(path.dirname(dataDir), { recursive: true });
  if (isRoot && !fs.existsSync(dataDir)) {
    fs.mkdirSync(dataDir, { recursive: true });
    execFileSync('chown', ['postgres:postgres', dataDir]);
    if (!canPostgresEnter(dataDir)) {
      fs.rmdirSync(dataDir);
      const elsewhere = path.join('/var/lib/postgresql', `cellarwright-${Buffer.from(dataDir).toString('hex').slice(-24)}`);
      fs.mkdirSync(elsewhere, { recursive: true });
      execFileSync('chown', ['postgres:postgres', elsewhere]);
      fs.symlinkSync(elsewhere, dataDir);
    }
  }
  if (!fs.existsSync(path.join(dataDir, 'PG_VERSION'))) {
    log(`initialising PostgreSQL in ${path.relative(root, dataDir) || dataDir}…`);
    fs.mkdirSync(dataDir, { recursive: true });
    pgExec('initdb', ['-D', dataDir, '-U', 'postgres', '--auth=trust', '-E', 'UTF8', '--locale=C.UTF-8', '--no-instructions'], {
      stdio: ['ignore', 'ignore', 'inherit'],
    });
  }
  const fast = throwaway ? ' -c fsync=off -c synchronous_commit=off -c full_page_writes=off' : '';
  const opts = `-c listen_addresses=127.0.0.1 -p ${port} -k ${dataDir} -c max_connections=200${fast}`;
  const startArgs = ['-D', dataDir, '-o', opts, '-l', path.join(dataDir, 'server.log'), '-w', '-t', '60', 'start'];
  const stopArgs = ['-D', dataDir, '-m', 'fast', '-w', 'stop'];
  pgExec('pg_ctl', startArgs, { stdio: ['ignore', 'ignore', 'inherit'] });
  return {
    url: `postgres://postgres@127.0.0.1:${port}/postgres`,
    stop() {
      try {
        pgExec('pg_ctl', stopArgs, { stdio: ['ignore', 'ignore', 'ignore'] });
      } catch {
        /* already stopped */
      }
    },
    /** Fast shutdown (every connection is terminated); resolves once it is down. */
    stopAsync: () => pgExecAsync('pg_ctl', stopArgs),
    /** Start the stopped cluster again; resolves once it accepts connections. */
    startAsync: () => pgExecAsync('pg_ctl', startArgs),
  };
}

/** Start a long-running child that inherits our output; returns the ChildProcess. */
export function startChild(name, cmd, args, env = {}) {
  const child = spawn(cmd, args, { cwd: root, stdio: 'inherit', env: { ...process.env, ...env } });
  child.on('exit', (code, signal) => {
    if (code !== 0 && signal == null) log(`${name} exited with ${code}`);
  });
  return child;
}

/**
 * Keep a long-running child up: when it stops on its own it is started again after a pause that
 * doubles with each quick failure (from `minDelayMs` up to `maxDelayMs`; a run longer than `stableMs`
 * resets it), and every stop is logged with its exit code or signal. `stop()` ends it for good and
 * resolves once it has exited (sending SIGKILL after `killAfterMs`).
 */
export function superviseChild(
  name,
  cmd,
  args,
  env = {},
  { minDelayMs = 1000, maxDelayMs = 15_000, stableMs = 30_000, killAfterMs = 12_000, stdio = 'inherit', onStart } = {},
) {
  let child = null;
  let stopped = false;
  let timer = null;
  let delay = minDelayMs;
  let starts = 0;
  const spawnOne = () => {
    timer = null;
    const startedAt = Date.now();
    const c = spawn(cmd, args, { cwd: root, stdio, env: { ...process.env, ...env } });
    child = c;
    starts += 1;
    onStart?.(c, starts);
    let down = false;
    const onDown = (why) => {
      if (down) return;
      down = true;
      if (child === c) child = null;
      if (stopped) return;
      const ran = Date.now() - startedAt;
      if (ran >= stableMs) delay = minDelayMs;
      log(`${name} stopped (${why}) after ${(ran / 1000).toFixed(1)} s; starting it again in ${(delay / 1000).toFixed(1)} s`);
      timer = setTimeout(spawnOne, delay);
      delay = Math.min(delay * 2, maxDelayMs);
    };
    c.on('error', (err) => onDown(`could not run: ${err.message}`));
    c.on('exit', (code, signal) => onDown(signal ? `signal ${signal}` : `exit code ${code}`));
  };
  spawnOne();
  return {
    name,
    get child() {
      return child;
    },
    get starts() {
      return starts;
    },
    stop(signal = 'SIGTERM') {
      stopped = true;
      if (timer) clearTimeout(timer);
      timer = null;
      return child ? stopChild(child, killAfterMs, signal) : Promise.resolve();
    },
  };
}

/** Stops a child with `signal` (SIGKILL after `killAfterMs`); resolves once it has exited. */
export function stopChild(child, killAfterMs = 10_000, signal = 'SIGTERM') {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    const kill = setTimeout(() => child.kill('SIGKILL'), killAfterMs);
    child.once('exit', () => {
      clearTimeout(kill);
      resolve();
    });
    child.kill(signal);
  });
}

export const tsx = path.join(root, 'node_modules', '.bin', 'tsx');
export const vite = path.join(root, 'node_modules', '.bin', 'vite');
export const tsc = path.join(root, 'node_modules', '.bin', 'tsc');
/** The built server (`npm run build`): backend/, shared/ and db/ as JavaScript, in the sources' layout. */
export const serverDir = path.join(root, 'dist', 'server');

export function runSync(cmd, args, env = {}) {
  run(cmd, args, { cwd: root, env: { ...process.env, ...env } });
}

/** Replace the database name of a postgres:// URL. */
export function withDatabase(url, name) {
  const u = new URL(url);
  u.pathname = `/${name}`;
  return u.toString();
}
