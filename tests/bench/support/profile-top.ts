/**
 * Summarises a `.cpuprofile` (from `node --cpu-prof`): the functions with the most self time,
 * and the share of samples by area (our code, auth core / jose, Astro, knex, pg, node internals).
 *
 * `npx tsx tests/bench/support/profile-top.ts <file.cpuprofile> [count]`
 */
import fs from 'node:fs';
import { isMain } from '../../../src/cli/is-main';

interface Node {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number };
  children?: number[];
}
interface Profile {
  nodes: Node[];
  samples: number[];
  timeDeltas: number[];
}

function area(url: string, name: string): string {
  if (!url) return name === '(garbage collector)' ? 'gc' : name.startsWith('(') ? name : 'native';
  if (url.startsWith('node:')) return 'node internals';
  const m = /node_modules\/((?:@[^/]+\/)?[^/]+)/.exec(url);
  if (m) return m[1];
  if (url.includes('/dist/server/')) return 'app (dist/server)';
  return url;
}

export function summarise(file: string, count = 25): string {
  const profile = JSON.parse(fs.readFileSync(file, 'utf8')) as Profile;
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const self = new Map<number, number>();
  profile.samples.forEach((id, i) => self.set(id, (self.get(id) ?? 0) + (profile.timeDeltas[i] ?? 0)));
  const total = [...self.values()].reduce((a, b) => a + b, 0);
  const fns = new Map<string, number>();
  const areas = new Map<string, number>();
  for (const [id, us] of self) {
    const { functionName, url, lineNumber } = byId.get(id)!.callFrame;
    const short = url.replace(/^.*node_modules\//, '').replace(/^.*\/dist\/server\//, 'dist/server/');
    const key = `${functionName || '(anonymous)'} ${short}:${lineNumber + 1}`;
    fns.set(key, (fns.get(key) ?? 0) + us);
    const a = area(url, functionName);
    areas.set(a, (areas.get(a) ?? 0) + us);
  }
  const pct = (us: number) => `${((100 * us) / total).toFixed(1).padStart(5)} %`;
  const lines = [`${file}: ${(total / 1e6).toFixed(1)} s sampled`, '', 'by area (self time):'];
  for (const [a, us] of [...areas].sort((x, y) => y[1] - x[1]).slice(0, 15)) lines.push(`${pct(us)}  ${a}`);
  lines.push('', `top ${count} functions (self time):`);
  for (const [f, us] of [...fns].sort((x, y) => y[1] - x[1]).slice(0, count)) lines.push(`${pct(us)}  ${f}`);
  return lines.join('\n');
}

if (isMain(import.meta.url)) console.log(summarise(process.argv[2], Number(process.argv[3] ?? 25)));
