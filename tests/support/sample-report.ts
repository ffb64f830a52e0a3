/**
 * An invented assessment shaped like the engine's stored result, for report tests and the
 * benchmark: `findings` checks (a third failing, critical first), `photos` JPEGs spread over
 * them, a swing-geometry record and one force trace. Names and numbers are made up.
 */
import sharp from 'sharp';
import type { ReportSource } from '../../src/lib/server/pdf/report-model';

const areas = ['pinch', 'gaps', 'signage', 'force', 'sensing', 'controls', 'build', 'power'] as const;
const severities = ['critical', 'major', 'minor'] as const;

export function sampleResult(findingCount = 20) {
  const findings = Array.from({ length: findingCount }, (_, i) => {
    const outcome = i % 3 === 0 ? 'fail' : i % 7 === 5 ? 'needs_info' : i % 11 === 10 ? 'n/a' : 'pass';
    return {
      ruleId: `${areas[i % areas.length]}.check-${i + 1}`,
      title: `Check ${i + 1}: ${['Hinge-side gap', 'Closing-edge sensor', 'Warning signs', 'Peak closing force', 'Photo-eye height', 'Control placement', 'Picket spacing', 'Earth bonding'][i % 8]}`,
      area: areas[i % areas.length],
      severity: severities[i % 3 === 0 ? (i / 3) % 3 : i % 3],
      outcome,
      missing:
        outcome === 'needs_info'
          ? [{ key: 'm.postGapMm', prompt: 'Measure the gap between the leaf and the post when open' }]
          : [],
      observed: { [`m.gapItem${i}Mm`]: 30 + i, 'answers.signsPosted': i % 2 === 0 ? 'no' : 'yes' },
      params: { maxGapMm: { value: 25, unit: 'mm' } },
      hrn: outcome === 'fail' ? { value: 45 + i, band: 'high' } : undefined,
      remediation: `Fit a guard or re-hang the leaf so the gap stays under the limit (item ${i + 1}).`,
      caution: `Keep hands and feet away from this part of the gate while it moves (item ${i + 1}).`,
      reference: { standard: 'UL 325-2016', clause: `32.1.${(i % 9) + 1}` },
    };
  });
  return {
    ruleset: { family: 'north-american-gate', version: '2026.1', contentSha256: 'a'.repeat(64) },
    inputSha256: 'b'.repeat(64),
    verdict: 'withdraw',
    complete: false,
    findings,
    areaScores: {
      pinch: 40,
      gaps: 72.5,
      signage: 100,
      force: 55,
      sensing: 88,
      controls: 100,
      build: null,
      power: 95,
    },
    counts: {},
    needsInfo: [],
    evidenceProblems: [],
  };
}

export async function samplePhoto(seed: number, width = 1200, height = 900): Promise<Buffer> {
  const raw = Buffer.alloc(width * height * 3);
  for (let i = 0; i < raw.length; i += 3) {
    const p = i / 3;
    const x = p % width;
    const y = Math.floor(p / width);
    raw[i] = (x * 255) / width;
    raw[i + 1] = ((y + seed * 37) * 255) / height;
    raw[i + 2] = ((x ^ y) + seed * 13) & 0xff;
  }
  return sharp(raw, { raw: { width, height, channels: 3 } })
    .jpeg({ quality: 80 })
    .toBuffer();
}

export async function sampleReportSource(
  options: { findings?: number; photos?: number } = {},
): Promise<ReportSource> {
  const result = sampleResult(options.findings ?? 20);
  const failing = result.findings.filter((f) => f.outcome === 'fail');
  const photos = await Promise.all(
    Array.from({ length: options.photos ?? 12 }, async (_, i) => ({
      itemKey: i < failing.length * 2 ? failing[i % failing.length].ruleId : `extraItem${i}`,
      caption: `Photo ${i + 1}`,
      data: await samplePhoto(i),
      format: 'jpg' as const,
      width: 1200,
      height: 900,
      takenAt: new Date('2026-11-20T15:04:00Z'),
    })),
  );
  const samples: Array<[number, number]> = Array.from({ length: 400 }, (_, i) => {
    const t = i * 0.005;
    return [t, t < 0.3 ? 0 : t < 0.5 ? (t - 0.3) * 2600 : Math.max(20, 520 - (t - 0.5) * 900)];
  });
  return {
    documentId: '00000000-0000-4000-8000-000000000001',
    kind: 'preview',
    generatedAt: new Date('2026-11-21T09:00:00Z'),
    organisation: {
      id: '00000000-0000-4000-8000-0000000000aa',
      name: 'Ironbark Gate Works',
      timeZone: 'America/Denver',
      displayUnits: 'imperial',
    },
    assessment: {
      id: '00000000-0000-4000-8000-0000000000bb',
      purpose: 'inspection',
      status: 'scored',
      visitedOn: new Date('2026-11-20T15:00:00Z'),
      submittedAt: new Date('2026-11-20T17:00:00Z'),
      supersedesId: null,
      result,
      resultSha256: 'c'.repeat(64),
      swingGeometry: {
        aMm: 150,
        bMm: 180,
        bracketFromHingeMm: 900,
        retractedLengthMm: 760,
        strokeMm: 300,
        targetOpeningDeg: 90,
        leafWidthMm: 1830,
      },
      // Two measurements as the auditor entered them: one in mm although the organisation is imperial.
      measurementsAsEntered: {
        gapItem0Mm: { value: 30, unit: 'mm', canonical: 30 },
        gapItem3Mm: { value: 1.3125, unit: 'in', canonical: 33.3375 },
      },
    },
    auditor: { name: 'Rowan Tessier', email: 'rowan@ironbark.test' },
    client: { name: 'Quillfeather Household', contactEmail: 'home@quillfeather.test' },
    site: { name: 'Home', lines: ['9 Larchmere Rise', 'Marrowfield, CO 80999', 'US'], usageClass: 1 },
    gate: {
      label: 'Driveway gate',
      kind: 'swing',
      leaves: 'double',
      openingDirection: 'pull_to_open',
      widthMm: 3660,
      heightMm: 1520,
      weightKg: 140,
      entered: {
        width: { value: 12, unit: 'ft', canonical: 3657.6 },
        height: { value: 5, unit: 'ft', canonical: 1524 },
      },
    },
    ruleset: {
      title: 'North American residential gates',
      version: '2026.1',
      contentSha256: 'a'.repeat(64),
      areaTitles: {
        pinch: 'Pinch and crush points',
        gaps: 'Gaps and openings',
        signage: 'Signs',
        force: 'Force and reversal',
        sensing: 'Entrapment sensing',
        controls: 'Controls',
        build: 'Gate construction',
        power: 'Power and wiring',
      },
    },
    photos,
    forceTraces: [
      {
        label: 'Closing edge, 300 mm gap',
        itemKey: 'closingEdge300',
        samples,
        limitN: 400,
        peakN: 520,
        passed: false,
      },
    ],
    signing: null,
  };
}
