/**
 * Files an auditor's phone would send: a camera JPEG that needs turning (EXIF orientation 6),
 * a force meter's CSV of a closing-edge test that stays within the limits, and one with a
 * damaged line.
 */
import sharp from 'sharp';

/** A 640×480 picture stored sideways with EXIF orientation 6, as phone cameras do. */
export async function cameraJpeg(colour = '#c98b16'): Promise<Buffer> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="640" height="480"><rect width="640" height="480" fill="#e1e7ee"/><rect x="40" y="60" width="560" height="300" fill="${colour}"/><rect x="40" y="360" width="560" height="30" fill="#1d2c3f"/></svg>`;
  return sharp(Buffer.from(svg))
    .jpeg({ quality: 80 })
    .withExif({ IFD2: { DateTimeOriginal: '2026:11:30 09:15:00' } })
    .withMetadata({ orientation: 6 })
    .toBuffer();
}

/**
 * A closing-edge trace sampled at 500 Hz (semicolon separated, decimal comma, header): contact
 * at 1 s, a 260 N peak, back under 150 N within 0.3 s, settling to 10 N.
 */
export function passingTraceCsv(): string {
  const lines = ['Zeit [s];Kraft [N]'];
  for (let i = 0; i <= 3500; i += 1) {
    const t = i / 500;
    let f = 0;
    if (t >= 1 && t < 1.1) f = ((t - 1) / 0.1) * 260;
    else if (t >= 1.1 && t < 1.4) f = 260 - ((t - 1.1) / 0.3) * 160;
    else if (t >= 1.4 && t < 3) f = 100 - ((t - 1.4) / 1.6) * 90;
    else if (t >= 3) f = 10;
    lines.push(`${t.toFixed(3).replace('.', ',')};${f.toFixed(1).replace('.', ',')}`);
  }
  return `${lines.join('\n')}\n`;
}

/** The same kind of file with a reading the meter garbled on line 4. */
export function damagedTraceCsv(): string {
  return ['time_s,force_N', '0.000,0', '0.002,0', '0.004,zz', '0.006,0'].join('\n');
}
