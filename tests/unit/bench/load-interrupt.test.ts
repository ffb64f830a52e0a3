/**
 * The load bench runs autocannon dozens of times in one process: one SIGINT listener must serve
 * them all (a listener per run passed Node's limit of 10 and warned), and Ctrl-C must stop the
 * run in progress, not one that ended long ago.
 */
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runAutocannon } from '../../bench/load';

let server: http.Server;
let url: string;

beforeAll(async () => {
  server = http.createServer((_req, res) => res.end('ok'));
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  url = `http://127.0.0.1:${(server.address() as AddressInfo).port}/`;
});

afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
});

describe('the load bench and Ctrl-C', () => {
  it('adds one SIGINT listener for any number of runs, with no MaxListenersExceededWarning', async () => {
    const before = process.listenerCount('SIGINT');
    const warnings: string[] = [];
    const onWarning = (warning: Error) => warnings.push(warning.name);
    process.on('warning', onWarning);
    try {
      for (let i = 0; i < 11; i++) {
        const result = await runAutocannon({ url, connections: 1, amount: 2 });
        expect(result.non2xx + result.errors).toBe(0);
      }
      await new Promise((resolve) => setTimeout(resolve, 50)); // warnings are emitted on the next tick
    } finally {
      process.off('warning', onWarning);
    }
    expect(process.listenerCount('SIGINT') - before).toBeLessThanOrEqual(1);
    expect(warnings).not.toContain('MaxListenersExceededWarning');
  }, 60_000);

  it('Ctrl-C stops the run in progress at once, and no further run starts', async () => {
    const started = Date.now();
    const running = runAutocannon({ url, connections: 1, duration: 20 });
    await new Promise((resolve) => setTimeout(resolve, 300));
    process.emit('SIGINT', 'SIGINT');
    const result = await running;
    expect(Date.now() - started).toBeLessThan(5_000);
    expect(result.requests.total).toBeGreaterThan(0);
    await expect(runAutocannon({ url, connections: 1, amount: 1 })).rejects.toThrow(/interrupted/);
  }, 30_000);
});
