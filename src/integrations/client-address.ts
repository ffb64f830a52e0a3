/**
 * Puts `import '<src/lib/server/http/client-address-hook.ts>'` at the top of the node
 * adapter's server entry in the production build, so the hook that decides the client address
 * (socket, or X-Forwarded-For as far as TRUST_PROXY allows) is subscribed before the server
 * listens. The build fails if the adapter's entry was not found, rather than ship a server
 * that believes any X-Forwarded-For. (`astro dev` gives the socket address on its own.)
 */
import { fileURLToPath } from 'node:url';
import type { AstroIntegration } from 'astro';

const hook = fileURLToPath(new URL('../lib/server/http/client-address-hook.ts', import.meta.url));
const adapterEntry = /[\\/]@astrojs[\\/]node[\\/]dist[\\/]server\.js$/;

export default function clientAddress(): AstroIntegration {
  let applied = false;
  return {
    name: 'latchwell-client-address',
    hooks: {
      'astro:config:setup': ({ command, updateConfig }) => {
        if (command !== 'build') return;
        updateConfig({
          vite: {
            plugins: [
              {
                name: 'latchwell-client-address-hook',
                transform(code, id) {
                  if (!adapterEntry.test(id.split('?')[0])) return null;
                  applied = true;
                  return { code: `import ${JSON.stringify(hook)};\n${code}`, map: null };
                },
              },
            ],
          },
        });
      },
      'astro:build:done': () => {
        if (!applied)
          throw new Error(
            'latchwell-client-address: the node adapter server entry was not found; the client address hook is missing from the build.',
          );
      },
    },
  };
}
