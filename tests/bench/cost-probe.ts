/**
 * What a request costs the machine, steadier than throughput on a shared host: the server's CPU
 * time and PostgreSQL's (every backend of the private cluster on LATCHWELL_PG_PORT) per request,
 * for /api/health, the signed-in assessment list and an assessment read, each run for a fixed
 * number of requests at 20 connections, in rounds that alternate the endpoints. Loopback only.
 *
 * `npx tsx tests/bench/cost-probe.ts [requests] [rounds]` (default 4000, 2); LOAD_TARGETS=list
 * runs only those (add `health` to have it); PROBE_BASELINE_ENTRY=dir/dist/server/serve.mjs runs
 * another build beside this one, slice for slice; BENCH_CPU_PROF_DIR=dir profiles the servers.
 */
import autocannon from 'autocannon';
import fs from 'node:fs';
import { demoPassword } from '../../db/seeds/demo/people';
import { signInCookie, startBenchApp } from './support/app';

const hz = 100; // USER_HZ: the unit of /proc/<pid>/stat's utime and stime
function cpuOf(pid: number): number {
  const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
  const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  return ((Number(f[11]) + Number(f[12])) * 1000) / hz;
}
function pgCpu(): number {
  let total = 0;
  for (const d of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(d)) continue;
    try {
      const cmd = fs.readFileSync(`/proc/${d}/cmdline`, 'utf8');
      if (!cmd.startsWith('postgres: ')) continue;
      const stat = fs.readFileSync(`/proc/${d}/stat`, 'utf8');
      const f = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      // Only this cluster's backends: their parent is the postmaster started on our port.
      const ppid = Number(f[1]);
      const pcmd = fs.readFileSync(`/proc/${ppid}/cmdline`, 'utf8');
      if (!pcmd.includes(process.env.LATCHWELL_PG_PORT ?? '54312')) continue;
      total += ((Number(f[11]) + Number(f[12])) * 1000) / hz;
    } catch {}
  }
  return total;
}

const amount = Number(process.argv[2] ?? 4000);
const rounds = Number(process.argv[3] ?? 2);

/** A running server, signed in as the office user, with the endpoints to probe. */
async function probeTarget(label: string, entry?: string) {
  const previous = process.env.LATCHWELL_SERVER_ENTRY;
  if (entry) process.env.LATCHWELL_SERVER_ENTRY = entry;
  const app = await startBenchApp();
  if (entry) {
    if (previous === undefined) delete process.env.LATCHWELL_SERVER_ENTRY;
    else process.env.LATCHWELL_SERVER_ENTRY = previous;
  }
  const base = app.server.url;
  const office = await signInCookie(base, 'office@quillmoor.test', demoPassword);
  const headers = { cookie: office, origin: base, accept: 'application/json' };
  const list = await (await fetch(`${base}/api/assessments?status=signed&pageSize=5`, { headers })).json();
  const readId: string = list.items[0].id;
  const endpoints: Record<string, autocannon.Options> = {
    health: { url: `${base}/api/health` },
    list: { url: `${base}/api/assessments?status=signed&pageSize=25`, headers },
    read: { url: `${base}/api/assessments/${readId}`, headers },
  };
  return { label, app, pid: app.server.child.pid!, endpoints };
}

// PROBE_BASELINE_ENTRY=another/dist/server/serve.mjs runs that build beside this one, each slice
// of one right after the same slice of the other, so both see the same neighbours.
const servers = [await probeTarget('')];
if (process.env.PROBE_BASELINE_ENTRY)
  servers.push(await probeTarget('baseline ', process.env.PROBE_BASELINE_ENTRY));
try {
  const only = process.env.LOAD_TARGETS?.split(',');
  for (const server of servers)
    for (const o of Object.values(server.endpoints)) await autocannon({ ...o, connections: 20, amount: 500 });
  const sums: Record<string, { node: number; pg: number; n: number; rps: number }> = {};
  for (let r = 0; r < rounds; r++) {
    for (const name of Object.keys(servers[0].endpoints)) {
      if (only && !only.includes(name)) continue;
      // Each round the other build goes first.
      for (const server of r % 2 ? [...servers].reverse() : servers) {
        const n0 = cpuOf(server.pid);
        const p0 = pgCpu();
        const res = await autocannon({ ...server.endpoints[name], connections: 20, amount });
        const s = (sums[`${server.label}${name}`] ??= { node: 0, pg: 0, n: 0, rps: 0 });
        s.node += cpuOf(server.pid) - n0;
        s.pg += pgCpu() - p0;
        s.n += res.requests.total;
        s.rps += res.requests.average / rounds;
        if (res.non2xx) console.log(`${server.label}${name}: ${res.non2xx} non-2xx`);
      }
    }
  }
  for (const [name, s] of Object.entries(sums))
    console.log(
      `${name.padEnd(16)} node ${((s.node / s.n) * 1000).toFixed(0).padStart(5)} µs/req  pg ${((s.pg / s.n) * 1000).toFixed(0).padStart(5)} µs/req  ${s.rps.toFixed(0)} req/s`,
    );
} finally {
  for (const server of servers) await server.app.server.stop();
}
process.exit(0);
