/**
 * Noto Sans for the PDF, from the files @fontsource/noto-sans ships (WOFF), unpacked once to
 * TrueType in memory (see woff.ts) and handed to react-pdf as data URLs; the renderer embeds
 * and subsets them. No network, no system fonts.
 * Latin first, then Latin Extended, Greek and Cyrillic as fallbacks for names and addresses.
 */
import { createRequire } from 'node:module';
import fs from 'node:fs';
import path from 'node:path';
import { Font } from '@react-pdf/renderer';
import { woffToSfnt } from './woff';

export const REPORT_FONT_FAMILIES = [
  'Noto Sans',
  'Noto Sans Latin Ext',
  'Noto Sans Greek',
  'Noto Sans Cyrillic',
];

const subsets: Array<[family: string, subset: string]> = [
  ['Noto Sans', 'latin'],
  ['Noto Sans Latin Ext', 'latin-ext'],
  ['Noto Sans Greek', 'greek'],
  ['Noto Sans Cyrillic', 'cyrillic'],
];
const weights = [400, 600, 700] as const;

let registered = false;

function fontsDir(): string {
  const candidates: string[] = [];
  try {
    const require = createRequire(import.meta.url);
    candidates.push(path.join(path.dirname(require.resolve('@fontsource/noto-sans/package.json')), 'files'));
  } catch {
    // Bundled builds may not resolve package.json; fall back to the working directory.
  }
  candidates.push(path.join(process.cwd(), 'node_modules/@fontsource/noto-sans/files'));
  const found = candidates.find((dir) => fs.existsSync(path.join(dir, 'noto-sans-latin-400-normal.woff')));
  if (!found) throw new Error(`Noto Sans font files not found (looked in ${candidates.join(', ')})`);
  return found;
}

function fontDataUrl(dir: string, file: string): string {
  return `data:font/ttf;base64,${woffToSfnt(fs.readFileSync(path.join(dir, file))).toString('base64')}`;
}

export function registerReportFonts(): void {
  if (registered) return;
  const dir = fontsDir();
  for (const [family, subset] of subsets) {
    Font.register({
      family,
      fonts: weights.flatMap((fontWeight) => [
        {
          src: fontDataUrl(dir, `noto-sans-${subset}-${fontWeight}-normal.woff`),
          fontWeight,
        },
        {
          src: fontDataUrl(dir, `noto-sans-${subset}-${fontWeight}-italic.woff`),
          fontWeight,
          fontStyle: 'italic' as const,
        },
      ]),
    });
  }
  // Words are wrapped, never hyphenated: a clause number or a standard's name must stay whole.
  Font.registerHyphenationCallback((word) => [word]);
  registered = true;
}
