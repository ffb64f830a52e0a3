/** Renders a report model to PDF bytes with react-pdf (fonts registered once per process). */
import { renderToBuffer } from '@react-pdf/renderer';
import { createElement } from 'react';
import { registerReportFonts } from './fonts';
import { ReportDocument } from './report-document';
import type { ReportModel } from './report-model';

export async function renderReportPdf(model: ReportModel): Promise<Buffer> {
  registerReportFonts();
  return renderToBuffer(createElement(ReportDocument, { model }) as Parameters<typeof renderToBuffer>[0]);
}
