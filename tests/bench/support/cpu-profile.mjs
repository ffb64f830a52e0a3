// Loaded into the bench server (NODE_OPTIONS=--import) only when BENCH_CPU_PROF_DIR is set.
// Node 20 refuses --cpu-prof in NODE_OPTIONS, so this does what it does through the inspector:
// sample from start-up and write <dir>/server-<pid>.cpuprofile when the bench stops the server.
import fs from 'node:fs';
import { Session } from 'node:inspector';
import path from 'node:path';

const dir = process.env.BENCH_CPU_PROF_DIR;
const session = new Session();
session.connect();
session.post('Profiler.enable');
session.post('Profiler.setSamplingInterval', { interval: 1000 });
session.post('Profiler.start');
process.once('SIGTERM', () => {
  session.post('Profiler.stop', (error, result) => {
    if (!error) {
      fs.mkdirSync(dir, { recursive: true });
      fs.writeFileSync(path.join(dir, `server-${process.pid}.cpuprofile`), JSON.stringify(result.profile));
    }
    process.exit(0);
  });
});
