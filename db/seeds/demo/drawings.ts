/**
 * Pictures for the demo: drawn with SVG and rasterised by sharp, never photographs. A gate
 * sketch stands in for each site photo, and a pen squiggle for a drawn signature.
 */
import sharp from 'sharp';

const escape = (text: string) =>
  text.replace(/[&<>"]/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;' })[c] ?? c);

/** A 1200×800 JPEG sketch of a gate with a caption, tinted per item so photos differ. */
export async function gateSketchJpeg(caption: string, hue: number): Promise<Buffer> {
  const bars = Array.from(
    { length: 14 },
    (_, i) => `<rect x="${230 + i * 52}" y="270" width="10" height="330" fill="#2b3f57"/>`,
  ).join('');
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="1200" height="800">
    <rect width="1200" height="800" fill="hsl(${hue},35%,82%)"/>
    <rect y="600" width="1200" height="200" fill="hsl(${hue},20%,55%)"/>
    <rect x="140" y="220" width="60" height="400" fill="#8a8f99"/><rect x="1000" y="220" width="60" height="400" fill="#8a8f99"/>
    <rect x="200" y="260" width="780" height="16" fill="#1d2c3f"/><rect x="200" y="580" width="780" height="16" fill="#1d2c3f"/>
    ${bars}
    <circle cx="930" cy="430" r="26" fill="#e0a634"/>
    <text x="600" y="120" font-family="sans-serif" font-size="48" text-anchor="middle" fill="#121c29">${escape(caption)}</text>
    <text x="600" y="760" font-family="sans-serif" font-size="28" text-anchor="middle" fill="#121c29">demo drawing — not a photograph</text>
  </svg>`;
  return sharp(Buffer.from(svg)).jpeg({ quality: 78 }).toBuffer();
}

/** A transparent PNG pen stroke, as a signature pad would send it (data URL). */
export async function squiggleSignaturePng(seed: number): Promise<string> {
  const points = Array.from(
    { length: 9 },
    (_, i) => `${30 + i * 45},${70 + Math.round(Math.sin(i * 1.7 + seed) * 30)}`,
  ).join(' ');
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="420" height="140"><polyline points="${points}" fill="none" stroke="#121c29" stroke-width="4" stroke-linecap="round" stroke-linejoin="round"/></svg>`;
  const png = await sharp(Buffer.from(svg)).png().toBuffer();
  return `data:image/png;base64,${png.toString('base64')}`;
}

/**
 * A force-meter export for one measuring point, sampled at 1 kHz: a rise to `peakN`, a fall to
 * a static level and a decay to a small residual — the shape EN 12445 describes, synthesised.
 */
export function forceTraceCsv(peakN: number, staticN: number, residualN: number): string {
  const lines = ['time_s;force_N'];
  for (let i = 0; i <= 6000; i++) {
    const t = i / 1000;
    let f: number;
    if (t < 0.05) f = 0;
    else if (t < 0.2) f = ((t - 0.05) / 0.15) * peakN;
    else if (t < 0.6) f = peakN - ((t - 0.2) / 0.4) * (peakN - staticN);
    else if (t < 4.0) f = staticN - ((t - 0.6) / 3.4) * (staticN - residualN);
    else f = residualN;
    lines.push(`${t.toFixed(3).replace('.', ',')};${f.toFixed(1).replace('.', ',')}`);
  }
  return lines.join('\n');
}
