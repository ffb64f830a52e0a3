import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** True when the module at `moduleUrl` is the script node was asked to run. */
export function isMain(moduleUrl: string): boolean {
  return Boolean(process.argv[1]) && path.resolve(process.argv[1]) === fileURLToPath(moduleUrl);
}
