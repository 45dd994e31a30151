// Several instances behind one load balancer: a signed-in member's bookings list (50 a page) at 50
// connections through Debian's nginx in front of one instance, then of two, each the built server as
// `npm start` runs it, on one PostgreSQL. Prints requests/s, p50 and p99 of each, how busy the machine was
// (how many of its cores, the load generator's share, and time taken by the host), and the ratio; not a test.
// BENCH_SECONDS sets each run's length, BENCH_PORT_BASE the first of the ports used (free ones otherwise),
// BENCH_CPU_PROF a folder for the instances' CPU profiles (node --cpu-prof).
import { availableParallelism } from 'node:os';
import path from 'node:path';
import autocannon from 'autocannon';
import { freePort, root, runSync } from '../scripts/lib.mjs';
import { productionEnv, signInCookie, startInstance, startLoadBalancer, type Instance, type LoadBalancer } from '../scripts/load-balancer.mjs';
import { atLeast, reportTarget } from './report.ts';
import { benchDatabase } from './bench-db.ts';
import { machineDuring, waitForQuiet } from './process-cpu.ts';

const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const CONNECTIONS = 50;
const LIST = '/api/bookings?page=1&pageSize=50';
const TARGET_RATIO = 1.3;
const portBase = process.env.BENCH_PORT_BASE ? Number(process.env.BENCH_PORT_BASE) : null;
let portsTaken = 0;
const nextPort = () => (portBase === null ? freePort() : Promise.resolve(portBase + portsTaken++));
const profileDir = process.env.BENCH_CPU_PROF ? path.resolve(process.env.BENCH_CPU_PROF) : null;

async function load(base: string, cookie: string) {
  await autocannon({ url: `${base}${LIST}`, connections: CONNECTIONS, duration: 2, headers: { cookie } }); // warm-up
  const cpu0 = process.cpuUsage();
  const measured = await machineDuring(availableParallelism(), () =>
    autocannon({ url: `${base}${LIST}`, connections: CONNECTIONS, duration: SECONDS, headers: { cookie } }),
  );
  const cpu = process.cpuUsage(cpu0);
  const r = measured.value;
  // A wrong answer is a failure; requests that ran past autocannon's 10 s (a machine busy with other work) are counted.
  if (r.non2xx) throw new Error(`${r.non2xx} answers other than 2xx`);
  return {
    rps: r.requests.average,
    p50: r.latency.p50,
    p99: r.latency.p99,
    kb: r.throughput.average / Math.max(1, r.requests.average) / 1024,
    timeouts: r.timeouts,
    busyCores: measured.busyCores,
    stolenCores: measured.stolenCores,
    // The load generator runs in this process, on the same cores.
    loadGeneratorCores: (cpu.user + cpu.system) / 1000 / (SECONDS * 1000),
  };
}

const bench = await benchDatabase('instances');
const started: Instance[] = [];
let balancer: LoadBalancer | null = null;
try {
  runSync(process.execPath, [path.join(root, 'backend', 'scripts', 'build.mjs'), '--server']);
  const env = { ...productionEnv(bench.url), TRUST_PROXY: 'loopback' };
  const nodeArgs = profileDir ? ['--cpu-prof', '--cpu-prof-dir', profileDir] : [];
  for (const name of ['a', 'b']) started.push(startInstance({ name, port: await nextPort(), env, built: true, nodeArgs }));
  await Promise.all(started.map((i) => i.ready()));
  await waitForQuiet('two instances started');
  const lbPort = await nextPort();

  balancer = await startLoadBalancer({ upstreams: [started[0]!.port], port: lbPort });
  const one = await load(balancer.url, await signInCookie(balancer.url, 'member@example.org'));
  await balancer.stop();
  balancer = await startLoadBalancer({ upstreams: started.map((i) => i.port), port: lbPort });
  const two = await load(balancer.url, await signInCookie(balancer.url, 'member@example.org'));

  const line = (label: string, r: typeof one) =>
    console.log(
      `  ${label}: ${r.rps.toFixed(0)} req/s, p50 ${r.p50} ms, p99 ${r.p99} ms (${r.kb.toFixed(1)} KiB an answer${r.timeouts ? `, ${r.timeouts} timed out` : ''}); ` +
        `the machine busy ${r.busyCores.toFixed(2)} of ${availableParallelism()} cores (the load generator ${r.loadGeneratorCores.toFixed(2)}), ${r.stolenCores.toFixed(2)} taken by the host`,
    );
  console.log(`  GET ${LIST} as a member, ${CONNECTIONS} connections, ${SECONDS} s, through nginx (round robin):`);
  line('one instance ', one);
  line('two instances', two);
  const ratio = two.rps / one.rps;
  reportTarget({
    name: 'two instances behind nginx vs one, requests/s',
    figure: Number(ratio.toFixed(2)),
    unit: '×',
    target: TARGET_RATIO,
    pass: atLeast(ratio, TARGET_RATIO),
  });
} finally {
  await balancer?.stop();
  await Promise.all(started.map((i) => i.stop()));
  await bench.drop();
}
