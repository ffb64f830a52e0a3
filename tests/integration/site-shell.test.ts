import { describe, expect, inject, it } from 'vitest';
import fs from 'node:fs';
import path from 'node:path';
import { projectRoot } from '../../src/cli/services';

const baseUrl = inject('baseUrl');

/** Every file under a folder, recursively. */
function filesUnder(dir: string): string[] {
  return fs
    .readdirSync(dir, { recursive: true, encoding: 'utf8' })
    .map((f) => path.join(dir, f))
    .filter((f) => fs.statSync(f).isFile());
}

describe('the public shell', () => {
  it('serves a home page that says what the product does, with the safety notice', async () => {
    const res = await fetch(`${baseUrl}/`);
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain('Latchwell');
    expect(html).toMatch(/gate/i);
    expect(html).toMatch(/authority having jurisdiction/);
    expect(html).toContain('name="viewport"');
  });

  it('loads scripts, styles and fonts only from its own host', async () => {
    const html = await (await fetch(`${baseUrl}/`)).text();
    const refs = [...html.matchAll(/(?:src|href)="([^"]+)"/g)].map((m) => m[1]);
    expect(refs.length).toBeGreaterThan(0);
    for (const ref of refs) expect(ref, ref).not.toMatch(/^(https?:)?\/\//);
  });

  it('ships no build output that fetches from another host', () => {
    const files = filesUnder(path.join(projectRoot, 'dist/client'));
    const css = files.filter((f) => f.endsWith('.css'));
    expect(css.length).toBeGreaterThan(0);
    const fontFaces = css.map((f) => fs.readFileSync(f, 'utf8')).join('\n');
    expect(fontFaces).toMatch(/font-family:\s*["']?Noto Sans/); // the shipped font is bundled
    for (const file of files.filter((f) => /\.(css|js|mjs|html)$/.test(f))) {
      const text = fs.readFileSync(file, 'utf8');
      // A request to another host would appear as url(...), an import, a src/href attribute or a fetch of an absolute URL.
      const external = text.match(
        /url\(\s*["']?https?:\/\/|import\s*\(?\s*["']https?:\/\/|from\s*["']https?:\/\/|(?:src|href)=["']https?:\/\/|fetch\(\s*["']https?:\/\//,
      );
      expect(external, `${path.relative(projectRoot, file)} references ${external?.[0]}`).toBeNull();
    }
  });

  it('answers an unknown page with 404', async () => {
    const res = await fetch(`${baseUrl}/no-such-page-here`);
    expect(res.status).toBe(404);
  });
});
