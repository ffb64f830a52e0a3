/**
 * Report benchmark (`npx tsx tests/bench/report.ts`, or `npm run bench -- report`): the median
 * time to render a report with 20 findings and 12 photos (1200 × 900 JPEG display copies, a
 * swing-geometry drawing and a force-trace plot), and the median time to sign the rendered PDF
 * with the organisation's certificate (placeholder, PKCS#7 over the byte range). Targets:
 * under one second each. The machine's load average is printed beside the figures.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { signPdfWithCertificate } from '../../src/lib/server/pdf/digital-signature';
import { organisationCertificate } from '../../src/lib/server/pdf/organisation-certificate';
import { buildReportModel } from '../../src/lib/server/pdf/report-model';
import { renderReportPdf } from '../../src/lib/server/pdf/render';
import { sampleReportSource } from '../support/sample-report';

export interface ReportBenchFigures {
  renderMedianMs: number;
  signMedianMs: number;
  /** CPU time (user + system) of this process per render / sign: less sensitive to a busy machine than wall time. */
  renderCpuMedianMs: number;
  signCpuMedianMs: number;
  renderRuns: number;
  signRuns: number;
  pdfBytes: number;
  pages: number;
}

const RUNS = 9;

const median = (values: number[]) =>
  [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)] as number;
const round1 = (n: number) => Math.round(n * 10) / 10;
const cpuMs = (since: NodeJS.CpuUsage) => {
  const used = process.cpuUsage(since);
  return (used.user + used.system) / 1000;
};

export async function runReportBench(): Promise<ReportBenchFigures> {
  const source = await sampleReportSource({ findings: 20, photos: 12 });
  // Warm-up: fonts are unpacked and registered, modules compiled.
  let pdf = await renderReportPdf(buildReportModel(source));
  const renderTimes: number[] = [];
  const renderCpu: number[] = [];
  for (let i = 0; i < RUNS; i++) {
    const cpu = process.cpuUsage();
    const started = performance.now();
    pdf = await renderReportPdf(buildReportModel({ ...source, generatedAt: new Date() }));
    renderTimes.push(performance.now() - started);
    renderCpu.push(cpuMs(cpu));
  }

  const previousDataDir = process.env.LATCHWELL_DATA_DIR;
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'latchwell-bench-'));
  process.env.LATCHWELL_DATA_DIR = dataDir;
  const signTimes: number[] = [];
  const signCpu: number[] = [];
  try {
    const certificate = organisationCertificate({
      id: source.organisation.id,
      name: source.organisation.name,
    });
    const details = {
      reason: 'Benchmark',
      name: source.organisation.name,
      contactInfo: 'bench@latchwell.test',
      location: 'Bench',
      signingTime: new Date(),
    };
    await signPdfWithCertificate(pdf, certificate.p12, certificate.passphrase, details);
    for (let i = 0; i < RUNS; i++) {
      const cpu = process.cpuUsage();
      const started = performance.now();
      await signPdfWithCertificate(pdf, certificate.p12, certificate.passphrase, details);
      signTimes.push(performance.now() - started);
      signCpu.push(cpuMs(cpu));
    }
  } finally {
    if (previousDataDir === undefined) delete process.env.LATCHWELL_DATA_DIR;
    else process.env.LATCHWELL_DATA_DIR = previousDataDir;
    fs.rmSync(dataDir, { recursive: true, force: true });
  }

  const figures: ReportBenchFigures = {
    renderMedianMs: round1(median(renderTimes)),
    signMedianMs: round1(median(signTimes)),
    renderCpuMedianMs: round1(median(renderCpu)),
    signCpuMedianMs: round1(median(signCpu)),
    renderRuns: RUNS,
    signRuns: RUNS,
    pdfBytes: pdf.length,
    pages: (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length,
  };
  console.log(
    `report: render median ${figures.renderMedianMs} ms (CPU ${figures.renderCpuMedianMs} ms; 20 findings, 12 photos, ${figures.pages} pages, ${Math.round(figures.pdfBytes / 1024)} KiB); ` +
      `sign median ${figures.signMedianMs} ms (CPU ${figures.signCpuMedianMs} ms); load average ${os
        .loadavg()
        .map((l) => l.toFixed(2))
        .join(' ')}`,
  );
  return figures;
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await runReportBench();
}
