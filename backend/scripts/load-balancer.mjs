// Several instances of the app on one PostgreSQL behind Debian's nginx (round robin, no sticky sessions),
// as a host would run them: used by tests/api/instances.test.ts and backend/bench/instances.bench.ts.
// Node built-ins only, like lib.mjs.
import { spawn } from 'node:child_process';
import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { freePort, nginxBin, root, serverDir, stopChild } from './lib.mjs';

/** The nginx configuration: one upstream of every instance, round robin, connections to them kept open. */
export function nginxConfig({ dir, port, upstreams }) {
  const servers = upstreams.map((p) => `    server 127.0.0.1:${p};`).join('\n');
  const temp = ['client_body', 'proxy', 'fastcgi', 'uwsgi', 'scgi'].map((t) => `  ${t}_temp_path ${path.join(dir, `${t}-temp`)};`).join('\n');
  return `worker_processes 1;
daemon off;
pid ${path.join(dir, 'nginx.pid')};
error_log ${path.join(dir, 'error.log')} warn;
events { worker_connections 1024; }
http {
  access_log off;
${temp}
  upstream cellarwright {
${servers}
    keepalive 64;
  }
  server {
    listen 127.0.0.1:${port};
    client_max_body_size 20m;
    location / {
      proxy_pass http://cellarwright;
      proxy_http_version 1.1;
      proxy_set_header Connection "";
      proxy_set_header Host $host;
      proxy_set_header X-Forwarded-For $proxy_add_x_forwarded_for;
      proxy_set_header X-Forwarded-Proto $scheme;
    }
  }
}
`;
}

/** What an instance needs to run with production settings over plain HTTP on loopback: fresh secrets, cookies not `Secure`. */
export function productionEnv(databaseUrl) {
  return {
    NODE_ENV: 'production',
    DATABASE_URL: databaseUrl,
    SESSION_SECRET: randomBytes(24).toString('hex'),
    STRIPE_SECRET_KEY: `sk_test_${randomBytes(12).toString('hex')}`,
    STRIPE_WEBHOOK_SECRET: `whsec_${randomBytes(12).toString('hex')}`,
    COOKIE_SECURE: 'false',
    PUBLIC_URL: 'http://127.0.0.1',
  };
}

/** Signs in at `base` (an instance or the load balancer) as a client that is no browser; the session cookie. */
export async function signInCookie(base, email, password = 'cellar-demo') {
  const res = await fetch(`${base}/api/auth/login`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email}: ${res.status} ${await res.text()}`);
  return res.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ');
}

/** Waits until `url` answers 200; throws with `what` after `timeoutMs`. */
export async function waitForOk(url, what, timeoutMs = 60_000) {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const ok = await fetch(url).then(
      (r) => r.ok,
      () => false,
    );
    if (ok) return;
    if (Date.now() > until) throw new Error(`${what} did not answer ${url} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/**
 * nginx in front of `upstreams` (ports on 127.0.0.1), run as the current user with its own prefix in a
 * temporary folder, on `port` (a free one when not given). Installs Debian's nginx when missing.
 */
export async function startLoadBalancer({ upstreams, port }) {
  const bin = nginxBin();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'cellarwright-nginx-'));
  const listen = port ?? (await freePort());
  const conf = path.join(dir, 'nginx.conf');
  fs.writeFileSync(conf, nginxConfig({ dir, port: listen, upstreams }));
  const log = [];
  const child = spawn(bin, ['-p', dir, '-e', path.join(dir, 'error.log'), '-c', conf], { stdio: ['ignore', 'pipe', 'pipe'] });
  child.stdout.on('data', (d) => log.push(String(d)));
  child.stderr.on('data', (d) => log.push(String(d)));
  const url = `http://127.0.0.1:${listen}`;
  const until = Date.now() + 15_000;
  // Up once it accepts a connection (any answer, even 502 while no instance is up yet).
  while (
    !(await fetch(`${url}/api/health`).then(
      () => true,
      () => false,
    ))
  ) {
    if (child.exitCode !== null || Date.now() > until) {
      throw new Error(
        `nginx did not start: ${log.join('')}${fs.existsSync(path.join(dir, 'error.log')) ? fs.readFileSync(path.join(dir, 'error.log'), 'utf8') : ''}`,
      );
    }
    await new Promise((r) => setTimeout(r, 100));
  }
  return {
    url,
    port: listen,
    async stop() {
      await stopChild(child, 5000, 'SIGQUIT');
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

/**
 * One instance of the server on `port`: the built JavaScript (`built`, as `npm start` runs it) or the
 * TypeScript sources through tsx, as one server process unless `env` sets WEB_CONCURRENCY. `env` is added to this
 * process's environment; `INSTANCE_NAME` names it;
 * `nodeArgs` go to node first (`--cpu-prof`, say).
 */
export function startInstance({ name, port, env, built = false, nodeArgs = [] }) {
  const args = [
    ...nodeArgs,
    ...(built ? ['--enable-source-maps', path.join(serverDir, 'backend', 'main.js')] : ['--import', 'tsx', path.join('backend', 'main.ts')]),
  ];
  const output = [];
  const child = spawn(process.execPath, args, {
    cwd: root,
    env: { ...process.env, HOST: '127.0.0.1', PORT: String(port), INSTANCE_NAME: name, WEB_CONCURRENCY: '1', ...env },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  child.stdout.on('data', (d) => output.push(String(d)));
  child.stderr.on('data', (d) => output.push(String(d)));
  const url = `http://127.0.0.1:${port}`;
  return {
    name,
    port,
    url,
    child,
    output,
    /** Resolves once it answers its health check; throws with what it wrote if it stops first or takes too long. */
    ready(timeoutMs = 180_000) {
      let onExit;
      const exited = new Promise((_resolve, reject) => {
        onExit = (code) => reject(new Error(`instance ${name} stopped (exit code ${code})`));
        child.once('exit', onExit);
      });
      return Promise.race([waitForOk(`${url}/api/health`, `instance ${name}`, timeoutMs), exited])
        .catch((err) => {
          throw new Error(`${err.message}\n${output.join('')}`);
        })
        .finally(() => child.off('exit', onExit));
    },
    stop: () => stopChild(child),
  };
}
